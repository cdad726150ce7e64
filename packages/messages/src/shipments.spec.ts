import { depositStatement, shipmentAlert } from './shipments';

const to = { name: 'Dana', email: 'dana@hospital.example', timeZone: 'America/New_York' };

describe('deposit statement', () => {
  it('shows the deposit, the deduction, the refund and each finding', () => {
    const mail = depositStatement(
      {
        loanReference: 'EV-2027-000001',
        lenderName: 'A Lender',
        hospitalName: 'A Hospital',
        currency: 'USD',
        deposit: 390_000,
        findings: [{ category: 'damage', note: 'Bent lever', charge: 12_000 }],
        kept: 12_000,
        returned: 378_000,
        uncovered: 0,
        url: 'https://evalon.example/loans/1',
      },
      to,
    );
    expect(mail.subject).toBe('Loan EV-2027-000001 closed: deposit statement');
    // Amounts in minor units; USD has two decimals (ISO 4217 exponent 2).
    expect(mail.text).toContain('$3,900.00');
    expect(mail.text).toContain('$120.00');
    expect(mail.text).toContain('$3,780.00');
    expect(mail.text).toContain('damage: Bent lever');
    expect(mail.text).not.toContain('Not covered');
  });

  it('reports an uncovered amount, in a zero-decimal currency as such', () => {
    const mail = depositStatement(
      {
        loanReference: 'EV-2027-000002',
        lenderName: 'A Lender',
        hospitalName: 'A Hospital',
        currency: 'JPY',
        deposit: 10_000,
        findings: [{ category: 'missing', note: 'Cable not returned', charge: 15_000 }],
        kept: 10_000,
        returned: 0,
        uncovered: 5_000,
        url: 'https://evalon.example/loans/2',
      },
      to,
    );
    // JPY has no minor unit (ISO 4217 exponent 0): 5000 means ¥5,000.
    expect(mail.text).toMatch(/Not covered by the deposit \(invoiced\):\s*¥5,000/);
  });
});

describe('shipment alerts', () => {
  it('words each condition and carries the decontamination caution on return reminders', () => {
    const base = {
      shipmentReference: 'EV-2027-000001-R1',
      loanReference: 'EV-2027-000001',
      depotName: 'East Depot',
      siteName: 'North Campus',
      hospitalName: 'A Hospital',
      dueBy: '2027-03-05',
      eta: null,
      trackingNumber: null,
      url: 'https://evalon.example/loans/1',
    };
    const reminder = shipmentAlert({ ...base, kind: 'return_reminder', direction: 'return' }, to);
    expect(reminder.subject).toBe('Return due: EV-2027-000001 ships back by 2027-03-05');
    expect(reminder.text).toContain('decontaminated before return');
    const overdue = shipmentAlert(
      { ...base, kind: 'overdue', direction: 'outbound', shipmentReference: 'EV-2027-000001-O1' },
      to,
    );
    expect(overdue.subject).toMatch(/^Overdue: EV-2027-000001-O1/);
    expect(overdue.text).not.toContain('decontaminated before return');
  });

  it('words a return on its way by the depot’s back-at-depot day', () => {
    const data = {
      shipmentReference: 'EV-2027-000001-R1',
      loanReference: 'EV-2027-000001',
      depotName: 'East Depot',
      siteName: 'North Campus',
      hospitalName: 'A Hospital',
      direction: 'return' as const,
      dueBy: '2027-03-10',
      eta: '2027-03-12',
      trackingNumber: 'WP0000000001',
      url: 'https://evalon.example/shipments/1',
    };
    const risk = shipmentAlert({ ...data, kind: 'return_at_risk' }, to);
    expect(risk.subject).toBe(
      'Return at risk: EV-2027-000001-R1 may reach the depot after 2027-03-10',
    );
    expect(risk.text).toMatch(/Back at depot by: Wednesday, March 10, 2027/);
    expect(risk.text).toMatch(/Expected at the depot: Friday, March 12, 2027/);
    expect(risk.text).toContain('depot’s calendar days');
    const overdue = shipmentAlert({ ...data, kind: 'return_overdue', eta: null }, to);
    expect(overdue.subject).toBe(
      'Return overdue: EV-2027-000001-R1 was not received by 2027-03-10',
    );
    expect(overdue.text).toContain('end of its back-at-depot day (depot time)');
    // Both still carry the decontamination caution of every return.
    expect(overdue.text).toContain('decontaminated before return');
  });
});
