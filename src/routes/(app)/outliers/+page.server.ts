import { familiesFor } from '$lib/server/services/analysis';
import type { PageServerLoad } from './$types';

// The figures are fetched by the browser from /api/v1/stats/outliers.
export const load: PageServerLoad = (event) => familiesFor(event, 'machinist');
