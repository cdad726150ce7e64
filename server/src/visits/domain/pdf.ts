import PDFDocument from 'pdfkit';

/** What the one-page sign-off record shows. */
export interface SignOffRecord {
  visitReference: string;
  hospitalName: string;
  siteName: string;
  modelName: string;
  visitFrom: string;
  visitTo: string;
  proctorName: string;
  traineeName: string;
  proctoredCases: number;
  threshold: number;
  signedAt: Date;
  statement: string;
  cases: { caseNumber: number; traineeRole: string; ratings: Record<string, number> }[];
  competencyLabels: Record<string, string>;
}

/** The caution printed on every record (product brief: Evalon records, it does not certify). */
export const signOffCaution =
  'This record documents cases supervised by the proctor named above. Evalon schedules and ' +
  'documents; it does not certify anyone. Privileging remains the hospital’s decision, made under ' +
  'its own rules (medical staff bylaws, local law and licensed practice). Case records are ' +
  'de-identified: no patient names, record numbers or dates of birth.';

const roleWords: Record<string, string> = {
  observed: 'Observed',
  assisted: 'Assisted',
  performed_supervised: 'Performed under supervision',
};

/**
 * Renders the sign-off record as a one-page A4 PDF (pdfkit, built-in Helvetica: no font files).
 * The document's dates are the sign-off instant, so the same sign-off always gives the same text.
 */
export function renderSignOffPdf(record: SignOffRecord): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margin: 50,
    info: {
      Title: `Proctored cases record ${record.visitReference}`,
      Author: 'Evalon',
      CreationDate: record.signedAt,
      ModDate: record.signedAt,
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  doc.fillColor('#1d5e66').fontSize(18).text('Record of proctored cases', { align: 'left' });
  doc.moveDown(0.3).fillColor('#444748').fontSize(10).text(`Visit ${record.visitReference}`);
  doc.moveDown(0.8).fillColor('#191c1d').fontSize(11);
  const facts: [string, string][] = [
    ['Hospital', `${record.hospitalName}, ${record.siteName}`],
    ['Platform model', record.modelName],
    ['Visit days', `${record.visitFrom} to ${record.visitTo} (campus calendar)`],
    ['Proctor', record.proctorName],
    ['Trainee', record.traineeName],
    [
      'Cases performed under supervision',
      `${record.proctoredCases} (hospital threshold: ${record.threshold})`,
    ],
    ['Signed', `${record.signedAt.toISOString().replace('T', ' ').slice(0, 16)} UTC`],
  ];
  for (const [label, value] of facts) {
    doc.font('Helvetica-Bold').text(`${label}: `, { continued: true });
    doc.font('Helvetica').text(value);
  }
  doc.moveDown(0.8).font('Helvetica-Bold').text('Cases on this visit');
  doc.font('Helvetica').fontSize(9.5);
  for (const c of record.cases.slice(0, 12)) {
    const ratings = Object.entries(c.ratings)
      .map(([k, v]) => `${record.competencyLabels[k] ?? k} ${v}/5`)
      .join('; ');
    doc.text(`Case ${c.caseNumber}: ${roleWords[c.traineeRole] ?? c.traineeRole}. ${ratings}`);
  }
  doc.moveDown(0.8).fontSize(11).font('Helvetica-Bold').text('Proctor’s statement');
  doc.font('Helvetica').text(record.statement);
  doc.moveDown(1.2).fontSize(9.5).fillColor('#444748').text(signOffCaution);
  doc.end();
  return done;
}
