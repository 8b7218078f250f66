// The engine version stamped on every CampaignResult, so a stored fit says which engine made it.
// It mirrors package.json "version"; the pure core may not read files, so the value is a constant
// and test/campaign/engine-version.test.ts fails when the two drift apart.
export const ENGINE_VERSION = '0.2.0';
