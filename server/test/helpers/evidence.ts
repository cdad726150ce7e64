import type { DataSource } from 'typeorm';
import type { LoanState } from '@evalon/contracts';
import { addCalendarDays } from '@evalon/scheduling';
import { makeHospital, makeLender, makeModel, makeUnit, mondayAfter, places } from './catalog';
import { makePerson, unique, type TestPerson } from './factories';
import { makeProctor, type TestProctor } from './proctors';

/** A loan at a hospital with two clinicians, a buyer, a proctor with a visit on it, a lender. */
export interface EvidenceWorld {
  loanId: number;
  unitIds: number[];
  /** A unit of the same lender that is not on the loan. */
  otherUnitId: number;
  hospitalId: number;
  lenderId: number;
  buyer: TestPerson;
  clinician: TestPerson;
  secondClinician: TestPerson;
  coordinator: TestPerson;
  /** The lender's fleet manager. */
  fleet: TestPerson;
  proctor: TestProctor;
  visitId: number;
}

/**
 * Writes the rows straight into the tables: the loan's journey up to delivery is other
 * components' business (and tested there); here only its state matters.
 */
export async function makeEvidenceWorld(
  ds: DataSource,
  options: { state?: LoanState; category?: 'laser' | 'robotic_platform' } = {},
): Promise<EvidenceWorld> {
  const lender = await makeLender(ds, places.eastDepot);
  const hospital = await makeHospital(ds, places.bostonCampus);
  const secondClinician = await makePerson(ds, hospital.id, 'clinician');
  const modelId = await makeModel(ds, lender.id, { category: options.category ?? 'laser' });
  const unitIds = [
    await makeUnit(ds, modelId, lender.depotId),
    await makeUnit(ds, modelId, lender.depotId),
  ];
  const otherUnitId = await makeUnit(ds, modelId, lender.depotId);
  const useFrom = mondayAfter(21);
  const d = (n: number) => addCalendarDays(useFrom, n);
  const now = new Date();
  const q = (sql: string, params: unknown[]) =>
    ds.query(sql, params) as Promise<{ insertId: number }>;
  const loanId = Number(
    (
      await q(
        `INSERT INTO loans (reference, state, hospital_id, site_id, site_time_zone, lender_id,
           use_from, use_to, ship_by, deliver_by, return_ship_by, back_at_depot, ready_again,
           deposit_amount, deposit_currency, note, requested_by_user_id, created_at, updated_at)
         VALUES (?, ?, ?, ?, 'America/New_York', ?, ?, ?, ?, ?, ?, ?, ?, 250000, 'USD', NULL, ?, ?, ?)`,
        [
          `EV-${unique()}`.slice(0, 20),
          options.state ?? 'delivered',
          hospital.id,
          hospital.campusId,
          lender.id,
          useFrom,
          d(4),
          d(-5),
          d(-2),
          d(6),
          d(8),
          d(10),
          hospital.buyer.userId,
          now,
          now,
        ],
      )
    ).insertId,
  );
  for (const unitId of unitIds) {
    await q(
      `INSERT INTO loan_units (loan_id, unit_id, hospital_id, model_id, depot_id, depot_time_zone,
         ship_by, deliver_by, use_from, use_to, return_ship_by, back_at_depot, ready_again, deposit_amount)
       VALUES (?, ?, ?, ?, ?, 'America/New_York', ?, ?, ?, ?, ?, ?, ?, 125000)`,
      [
        loanId,
        unitId,
        hospital.id,
        modelId,
        lender.depotId,
        d(-5),
        d(-2),
        useFrom,
        d(4),
        d(6),
        d(8),
        d(10),
      ],
    );
  }
  const proctor = await makeProctor(ds);
  const visitId = Number(
    (
      await q(
        `INSERT INTO visits (reference, kind, state, hospital_id, site_id, site_time_zone,
           jurisdiction, model_id, loan_id, visit_from, visit_to, cases, requested_by_user_id,
           proctor_user_id, created_at, updated_at)
         VALUES (?, 'proctoring', 'accepted', ?, ?, 'America/New_York', 'US-MA', ?, ?, ?, ?, 3, ?, ?, ?, ?)`,
        [
          `PV-${unique()}`.slice(0, 24),
          hospital.id,
          hospital.campusId,
          modelId,
          loanId,
          useFrom,
          d(1),
          hospital.buyer.userId,
          proctor.userId,
          now,
          now,
        ],
      )
    ).insertId,
  );
  return {
    loanId,
    unitIds,
    otherUnitId,
    hospitalId: hospital.id,
    lenderId: lender.id,
    buyer: hospital.buyer,
    clinician: hospital.clinician,
    secondClinician,
    coordinator: lender.coordinator,
    fleet: lender.fleet,
    proctor,
    visitId,
  };
}
