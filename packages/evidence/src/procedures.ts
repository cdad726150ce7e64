/**
 * General procedure families per equipment category, for the case form's procedure list. Our
 * own short list of generic clinical terms (no brand or device names); keys are the catalog's
 * category values. "other" is always offered so the list never blocks a record.
 */
export const procedureFamilies = {
  robotic_platform: [
    'prostatectomy',
    'partial_nephrectomy',
    'hysterectomy',
    'colorectal_resection',
    'hernia_repair',
    'cholecystectomy',
    'other',
  ],
  flexible_endoscope: [
    'ureteroscopy',
    'cystoscopy',
    'bronchoscopy',
    'upper_gi_endoscopy',
    'colonoscopy',
    'other',
  ],
  laser: ['ureteroscopic_lithotripsy', 'percutaneous_lithotripsy', 'prostate_enucleation', 'other'],
  imaging: ['fluoroscopy_guided', 'ultrasound_guided', 'endoscopic_imaging', 'other'],
  fluid_management: ['hysteroscopy', 'arthroscopy', 'ureteroscopy', 'other'],
  // Instruments and other accessories serve the platforms above: the common families of each.
  accessory: [
    'ureteroscopic_lithotripsy',
    'ureteroscopy',
    'prostatectomy',
    'partial_nephrectomy',
    'hysterectomy',
    'cystoscopy',
    'other',
  ],
} as const;

/** A catalog category that has procedure families. */
export type ProcedureCategory = keyof typeof procedureFamilies;

/** Human labels of every procedure family. */
export const procedureLabels: Record<string, string> = {
  prostatectomy: 'Prostatectomy',
  partial_nephrectomy: 'Partial nephrectomy',
  hysterectomy: 'Hysterectomy',
  colorectal_resection: 'Colorectal resection',
  hernia_repair: 'Hernia repair',
  cholecystectomy: 'Cholecystectomy',
  ureteroscopy: 'Ureteroscopy',
  cystoscopy: 'Cystoscopy',
  bronchoscopy: 'Bronchoscopy',
  upper_gi_endoscopy: 'Upper GI endoscopy',
  colonoscopy: 'Colonoscopy',
  ureteroscopic_lithotripsy: 'Ureteroscopic lithotripsy',
  percutaneous_lithotripsy: 'Percutaneous lithotripsy',
  prostate_enucleation: 'Prostate enucleation',
  fluoroscopy_guided: 'Fluoroscopy-guided procedure',
  ultrasound_guided: 'Ultrasound-guided procedure',
  endoscopic_imaging: 'Endoscopic imaging',
  hysteroscopy: 'Hysteroscopy',
  arthroscopy: 'Arthroscopy',
  other: 'Other',
};

/** Every procedure family once, in first-seen order. */
export const allProcedures: readonly string[] = [
  ...new Set(Object.values(procedureFamilies).flat()),
];

/** Procedure families offered for loans of units in these categories (union, `other` last). */
export function proceduresFor(categories: readonly string[]): string[] {
  const found = new Set<string>();
  for (const c of categories) {
    for (const p of (procedureFamilies as Record<string, readonly string[]>)[c] ?? []) {
      if (p !== 'other') found.add(p);
    }
  }
  return [...found, 'other'];
}
