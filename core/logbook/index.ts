/** The beam-health logbook's pure logic: comparison, trends and control charts, export, reports. */
export * from './types.ts';
export * from './errors.ts';
export * from './validate.ts';
export * from './compare.ts';
export * from './controlChart.ts';
export * from './trend.ts';
export * from './images.ts';
export * from './svg.ts';
export * from './export.ts';
export * from './format.ts';
export * from './report.ts';
