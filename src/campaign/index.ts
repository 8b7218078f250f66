// The campaign domain: records and their schema, validation, reductions, solveCampaign, the demo.
export * from './records.ts';
export type * from './result.ts';
export { ENGINE_VERSION } from './engine-version.ts';
export { validateCampaign, checkCampaignFile, checkCampaignRecords, crossRecordProblems, formatFieldPath, type CampaignCheck } from './validate-campaign.ts';
export { campaignJsonSchema, campaignJsonSchemaText, CAMPAIGN_SCHEMA_ID } from './campaign-json-schema.ts';
export { reduceStationLatitudes, HUBER_LOCATION_K, type StationLatitude, type LatitudeEstimate, type LatitudeReadingFit, type StationLatitudeOptions } from './station-latitudes.ts';
export { reduceArcToEllipsoid, arcMeanHeight, type ArcHeightSource } from './reduce-arc.ts';
export { degreeRow, degreeRows, type ArcGeometry, type DegreeRow } from './degree-rows.ts';
export { formatSigma } from './format-sigma.ts';
export { prepareArcs, MIN_ARC_SPAN_DEG, type PreparedArc } from './prepare-arcs.ts';
export { fitEllipsoidToArcs, F_SEARCH_MIN, F_SEARCH_MAX, F_TOLERANCE, F_GRID_STEP, type ArcForFit, type RigorousFitOptions, type RigorousFitResult } from './rigorous-fit.ts';
export { fitDegreeModel, degreeProblem, DEGREE_COEFFICIENT_NAMES, type DegreeModelId } from './degree-model.ts';
export { degreeModelError, type ModelErrorStatement } from './model-error.ts';
export { degreeFigure, ellipsoidFigure } from './figure-uncertainty.ts';
export { flagResiduals, type ResidualFlags } from './residual-flags.ts';
export { solveCampaign, DEFAULT_SUSPECT_THRESHOLD, DEFAULT_REFERENCE_ELLIPSOID, CHI_SQUARE_ALPHA } from './solve-campaign.ts';
export { demoCampaign, DEMO_BLUNDERS, DEMO_ARC_BLUNDERS_M, DEMO_SEED, DEMO_ELLIPSOID_ID, DEMO_STATIONS, type DemoStation } from './demo.ts';
export { seededRandom, type SeededRandom } from './seeded-random.ts';
// Campaign decisions: correlated arcs, reliability, planning, sufficiency, bootstrap, comparison.
export { arcNetwork, type ArcNetwork, type NetworkArc, type NetworkStation, type NetworkOptions } from './reliability-network.ts';
export { fitCorrelatedArcs, designCovariance, arcDesign, type CorrelatedFit, type CorrelatedStatus, type ArcDesign } from './reliability-gls.ts';
export { campaignReliability, type CampaignReliability, type ReadingReliability, type ReliabilityOptions } from './reliability.ts';
export { planCampaign, candidateLatitudes, type CampaignPlan, type PlanCandidate, type PlanOptions } from './plan-next-station.ts';
export { stationSufficiency, DEFAULT_TARGET_SIGMA_ARCSEC, type StationSufficiency } from './sufficiency.ts';
export { bootstrapFigure, DEFAULT_BOOTSTRAP_REPLICATES, DEFAULT_BOOTSTRAP_SEED, type BootstrapMethod, type BootstrapResult, type BootstrapSummary, type BootstrapOptions } from './bootstrap.ts';
export { compareWithEllipsoids, COMPARISON_ALPHA, type EllipsoidComparison, type FigureWithUncertainty } from './compare-ellipsoids.ts';
