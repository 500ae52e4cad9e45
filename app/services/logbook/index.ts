/** The beam-health logbook service: storage (sql.js), frames, fitting bridge, reports. */
export { openLogbook, restoreLastGood, Logbook, LogbookProblem, normaliseTags, toIsoTime, softwareVersion } from './logbook.ts';
export type { OpenLogbookOptions, NewAsset, NewDisc, NewMeasurement, FrameInput, MeasurementFilter } from './logbook.ts';
export { defaultLogbookPath, resolveLogbookPath, lastGoodPath, lockPath, framesDir } from './paths.ts';
export { setSqlWasmPath } from './sqlite.ts';
export { addMeasurementFromFrames, refitMeasurement, loadRunFit } from './fitBridge.ts';
export type { FitJob, RunFit } from './fitBridge.ts';
export { measurementReport, comparisonReport, trendReport } from './reports.ts';
export { APPLICATION_ID, CURRENT_SCHEMA_VERSION, MIGRATIONS } from './schema.ts';
