// The shop's gauges as the instruments page lists and changes them: registering one, entering a
// calibration, retiring and bringing back. Each change is audited in its own transaction.
import { inShop } from '../db';
import { conflict, notFound } from '../errors';
import { audit } from '../queries/audit';
import { calibrationHistory, insertInstrument, instrumentById, listInstruments, recordCalibration, serialInUse, setRetired } from '../queries/instruments';
import type { Who } from './entry';

const NO_GAUGE = 'No such gauge in this shop.';

/** Every gauge and every calibration on record. */
export function instrumentsAndHistory(shopId: string) {
	return inShop(shopId, async (tx) => {
		const [list, history] = await Promise.all([listInstruments(tx, shopId), calibrationHistory(tx, shopId)]);
		return { instruments: list, history };
	});
}

export interface NewInstrument {
	name: string;
	kind: Parameters<typeof insertInstrument>[1]['kind'];
	serial: string;
	resolutionMm: number | null;
	calibratedOn: string;
	intervalDays: number;
}

/** Registers a gauge with its calibration on record (409 when the serial is taken). */
export function registerInstrument(shopId: string, who: Who, d: NewInstrument): Promise<void> {
	return inShop(shopId, async (tx) => {
		if (await serialInUse(tx, shopId, d.serial)) throw conflict(`A gauge with serial ${d.serial} is already registered.`, { serial: `A gauge with serial ${d.serial} is already registered.` });
		const row = await insertInstrument(tx, { shopId, ...d }, who.userId);
		await audit(tx, shopId, who, { entity: 'instrument', entityId: row.id, action: 'create', after: { ...d } });
	});
}

/** Records a calibration of a gauge of the shop (404 otherwise); the gauge's name. */
export function calibrateInstrument(shopId: string, who: Who, d: { id: string; calibratedOn: string; intervalDays: number; note: string }): Promise<string> {
	return inShop(shopId, async (tx) => {
		const before = await recordCalibration(tx, { shopId, instrumentId: d.id, calibratedOn: d.calibratedOn, intervalDays: d.intervalDays, note: d.note, recordedBy: who.userId });
		if (!before) throw notFound(NO_GAUGE);
		await audit(tx, shopId, who, {
			entity: 'instrument',
			entityId: d.id,
			action: 'update',
			before: { calibratedOn: before.calibratedOn, intervalDays: before.intervalDays },
			after: { calibratedOn: d.calibratedOn, intervalDays: d.intervalDays, note: d.note }
		});
		return before.name;
	});
}

/** Retires a gauge (no longer offered in the grid) or brings it back; its name. */
export function retireInstrument(shopId: string, who: Who, id: string, retired: boolean): Promise<string> {
	return inShop(shopId, async (tx) => {
		const before = await instrumentById(tx, shopId, id);
		if (!before) throw notFound(NO_GAUGE);
		await setRetired(tx, shopId, before.id, retired);
		await audit(tx, shopId, who, { entity: 'instrument', entityId: before.id, action: 'update', before: { retired: before.retired }, after: { retired } });
		return before.name;
	});
}
