export { SplitMix64 } from './seeded-random.ts';
export { DATASET_MAGIC, readDataset, readDatasetHeader, writeDataset, type Dataset, type DatasetHeader } from './dataset-file.ts';
