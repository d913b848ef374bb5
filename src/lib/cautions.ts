// The cautions Lapmark shows wherever measurements decide whether a head is safe to run:
// on the head page, the inspection grid, the printed report and the report e-mail.
export const CAUTIONS: readonly string[] = [
	'A valve that drops into a cylinder destroys the engine. Do not put a head back in service on readings that are outside the limits or that you doubt.',
	'Fluid seal tests use flammable solvents: work with good ventilation, away from sparks, flames and hot parts, and keep the solvent in closed containers.',
	'A cylinder leakage test with compressed air can turn the engine over suddenly when the piston is not at top dead centre: keep hands and tools clear of the crankshaft, belts and fan, and hold the crankshaft.',
	'The limits in Lapmark are the shop’s own. They never replace the engine maker’s service data; where the two differ, the maker’s data applies.',
	'Follow local codes and licensed practice for the work, for the solvents and for their disposal.'
];
