import { familiesFor } from '$lib/server/services/analysis';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = (event) => familiesFor(event, 'machinist');
