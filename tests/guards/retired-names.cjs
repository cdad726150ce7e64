// Names retired from the demo scenario and the test fixtures. They sat too close to real
// organisations, clinics or device brands (a hospital one letter away from a real one, brand-like
// model words) or to a well-known retailer ("Home depot" as a label). One list, used by the
// repository guard (tests/guards/demo-names.test.ts) and by the screenshot script, which refuses
// to save a picture that shows one. This file is the only place allowed to spell them.

/** @type {{pattern: RegExp, use: string}[]} Matched case-sensitively as written. */
const retiredNames = [
  { pattern: /Harbourview|harbourview/, use: 'Velmora Health / velmora.example' },
  { pattern: /Rheinau|rheinau/, use: 'Klinikum Orlenbach / orlenbach.example' },
  { pattern: /Kestrel|kestrel/, use: 'Quorvel Surgical / quorvel.example' },
  {
    pattern: /\bMeridian\b|'meridian'|organisations\.meridian/,
    use: 'an invented lender name in fixtures (Dralvik Medical Loans)',
  },
  {
    pattern: /Northgate|northgate/,
    use: 'an invented hospital name in fixtures (Zelvara Hospitals)',
  },
  {
    pattern: /Pathfinder|FlexView|ClearPath|IrriFlow|Aurora 4K|Lumen TFL|Lumen laser/,
    use: 'a letter-digit designation (Quorvel R2, U75, C11, T60, V4, P1)',
  },
  {
    pattern:
      /Vantage ureteroscope|Atlas robotic|Slimline ureteroscope|Vista imaging|Beacon imaging/,
    use: 'a letter-digit designation in fixtures',
  },
  {
    pattern: /\b(KPR2|KFV75|KCP11|KTFL60|KA4K|KPIS)-\d/,
    use: 'the Quorvel serial prefixes (QR2, QU75, QC11, QT60, QV4, QP1, QR2S)',
  },
  { pattern: /\b[Hh]ome depot\b/, use: '"base depot"' },
  {
    pattern: /\bShips by\b/,
    use: '"Ship by" (one wording for the milestone on screens and in e-mails)',
  },
];

/** The first retired name in `text`, or null. */
function findRetiredName(text) {
  for (const { pattern, use } of retiredNames) {
    const m = pattern.exec(text);
    if (m) return { name: m[0], use };
  }
  return null;
}

module.exports = { retiredNames, findRetiredName };
