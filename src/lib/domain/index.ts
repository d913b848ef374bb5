// The trade's small pure rules that the browser and the server both apply. Imports nothing
// outside this folder, so a component and a server statistic can share them.
export * from './days';
export * from './robust';
export * from './control-rules';
export * from './suspect';
export * from './usual-range';
