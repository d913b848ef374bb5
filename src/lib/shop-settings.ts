// A shop's own units and currency, chosen when the shop is created (client + server).
import { DISTANCE_UNITS } from './measurements';

/** Lengths on the shop's screens and papers: millimetres or inches (stored in mm either way). */
export const SHOP_LENGTH_UNITS = ['mm', 'in'] as const;
export type ShopLengthUnit = (typeof SHOP_LENGTH_UNITS)[number];
/** Mileage: kilometres or miles (stored in km either way). */
export const SHOP_DISTANCE_UNITS = DISTANCE_UNITS;
export type ShopDistanceUnit = (typeof SHOP_DISTANCE_UNITS)[number];

/** ISO 4217 codes offered when a shop is created. */
export const CURRENCIES = ['EUR', 'USD', 'GBP', 'CAD', 'AUD', 'NZD', 'CHF', 'SEK', 'NOK', 'DKK', 'PLN', 'CZK', 'JPY', 'ZAR'] as const;
export type Currency = (typeof CURRENCIES)[number];
export const CURRENCY_LABEL: Record<Currency, string> = {
	EUR: 'Euro (EUR)',
	USD: 'US dollar (USD)',
	GBP: 'Pound sterling (GBP)',
	CAD: 'Canadian dollar (CAD)',
	AUD: 'Australian dollar (AUD)',
	NZD: 'New Zealand dollar (NZD)',
	CHF: 'Swiss franc (CHF)',
	SEK: 'Swedish krona (SEK)',
	NOK: 'Norwegian krone (NOK)',
	DKK: 'Danish krone (DKK)',
	PLN: 'Polish złoty (PLN)',
	CZK: 'Czech koruna (CZK)',
	JPY: 'Japanese yen (JPY)',
	ZAR: 'South African rand (ZAR)'
};
export const LENGTH_UNIT_LABEL: Record<ShopLengthUnit, string> = { mm: 'Millimetres (mm)', in: 'Inches (in)' };
export const DISTANCE_UNIT_LABEL: Record<ShopDistanceUnit, string> = { km: 'Kilometres (km)', mi: 'Miles (mi)' };
