// CSV output that is safe to open in a spreadsheet: a text cell that starts with = + - @, a tab
// or a carriage return is prefixed with ' so it is shown, not run as a formula (OWASP, "CSV
// Injection"). Numbers are written as numbers. Quoting is RFC 4180, by papaparse.
import Papa from 'papaparse';

export function neutralise(cell: unknown): string | number | null {
	if (cell === null || cell === undefined) return '';
	if (typeof cell === 'number') return Number.isFinite(cell) ? cell : '';
	if (cell instanceof Date) return cell.toISOString();
	const s = String(cell);
	return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

export function csvLine(cells: unknown[]): string {
	return Papa.unparse([cells.map(neutralise)], { newline: '\r\n' }) + '\r\n';
}
