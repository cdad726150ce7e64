/* The `lender_settings` table: each lender's shipping settings. */
import type { EntityManager } from 'typeorm';
import type { ShippingSettings } from '@evalon/contracts';
import { LenderSettingsEntity } from './entities';
import { json } from './sql-json';

/** A lender's saved settings, or null when it uses the defaults. */
export async function findLenderSettings(
  m: EntityManager,
  lenderId: number,
): Promise<{ settings: ShippingSettings; updatedAt: Date } | null> {
  const row = await m.findOne(LenderSettingsEntity, { where: { organisationId: lenderId } });
  if (!row) return null;
  return {
    settings: {
      distanceBands: json<ShippingSettings['distanceBands']>(row.distanceBands),
      customsDays: row.customsDays,
      leadDays: row.leadDays,
      firstLoanLeadDays: row.firstLoanLeadDays,
      decontaminationDays: row.decontaminationDays,
      turnaroundDays: row.turnaroundDays,
    },
    updatedAt: row.updatedAt,
  };
}

/** Saves a lender's settings (insert or replace). */
export async function saveLenderSettings(
  m: EntityManager,
  lenderId: number,
  settings: ShippingSettings,
  userId: number | null,
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO lender_settings (organisation_id, distance_bands, customs_days, lead_days,
        first_loan_lead_days, decontamination_days, turnaround_days, updated_at, updated_by_user_id)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE distance_bands = VALUES(distance_bands),
        customs_days = VALUES(customs_days), lead_days = VALUES(lead_days),
        first_loan_lead_days = VALUES(first_loan_lead_days),
        decontamination_days = VALUES(decontamination_days),
        turnaround_days = VALUES(turnaround_days), updated_at = VALUES(updated_at),
        updated_by_user_id = VALUES(updated_by_user_id)`,
    [
      lenderId,
      JSON.stringify(settings.distanceBands),
      settings.customsDays,
      settings.leadDays,
      settings.firstLoanLeadDays,
      settings.decontaminationDays,
      settings.turnaroundDays,
      now,
      userId,
    ],
  );
}
