// Display formatting shared by the screens.
export * from './format-values.ts';
