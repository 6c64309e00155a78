// Pure SVG renderers of Tocsin's plots (server PDFs and exports, client downloads). See each module's header.
export { bPlaneSvg, bPlaneData, bPlaneBounds, bPlaneLayout, thinPoints, BODY_RADIUS_KM } from './bplane';
export type { BPlaneSvgOptions, BPlaneData, BPlaneBounds, BPlaneLayout, BPlaneUnit } from './bplane';
export { distanceSvg, distanceSeries, hyperbolaDistanceKm, BODY_GM_KM3_S2 } from './distance';
export type { DistanceSvgOptions, DistanceSeries, DistanceSeriesOptions } from './distance';
export { covarianceEllipse, ellipsePoints, niceTicks, tickLabel, PLOT_COLORS } from './svg';
export { residualsSvg, residualPoints, nightMeans, residualRangeArcsec, stationColors, dateTicks, dateLabel, STATION_COLORS, EXCLUDED_COLOR } from './residuals';
export type { ResidualsSvgOptions, ResidualPoint, ResidualStatus, NightMean } from './residuals';
