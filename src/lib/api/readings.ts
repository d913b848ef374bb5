// GET /api/v1/readings as the browser sees it: one page of readings for a table, and the
// export links built from the same filters. The shapes are the contract's ($lib/contract).
export type { ReadingCount, ReadingItem, ReadingsPage } from '../contract';
