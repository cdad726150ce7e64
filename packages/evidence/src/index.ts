// Evaluation evidence: pure computation over de-identified case records (no I/O).
export * from './volume';
export * from './summary';
export * from './learning-curve';
export * from './outcomes';
export * from './procedures';
export * from './deidentify';
export * from './metrics';
export * from './report-charts';
export * from './csv-guard';
export * from './utilisation';
