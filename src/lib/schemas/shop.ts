// Inputs that create a shop: the public sign-up form and `npm run shop:create`. Relative imports
// only, so the operator's script (run by tsx, without SvelteKit's aliases) checks the same way.
import { z } from 'zod';
import { CURRENCIES, SHOP_DISTANCE_UNITS, SHOP_LENGTH_UNITS } from '../shop-settings';
import { emailSchema, newPasswordSchema } from './auth';

// PostgreSQL text cannot hold NUL; other control characters have no place in a name either.
const plainText = (what: string) =>
	z
		.string({ message: `Type ${what}.` })
		.trim()
		.min(1, `Type ${what}.`)
		.max(120, 'At most 120 characters.')
		.refine((s) => !/[\u0000-\u001f\u007f]/.test(s), 'Letters, digits, spaces and punctuation only (no control characters).');

export const shopNameSchema = plainText("the shop's name").refine((s) => /[\p{L}\p{N}]/u.test(s), "The shop's name needs at least one letter or digit.");
export const ownerNameSchema = plainText('your name');
export const lengthUnitSchema = z.enum(SHOP_LENGTH_UNITS, { message: 'Choose mm or in.' });
export const distanceUnitSchema = z.enum(SHOP_DISTANCE_UNITS, { message: 'Choose km or mi.' });
export const currencySchema = z.enum(CURRENCIES, { message: `Choose one of ${CURRENCIES.join(', ')}.` });

export const shopSettingsSchema = z.object({
	shopName: shopNameSchema,
	lengthUnit: lengthUnitSchema,
	distanceUnit: distanceUnitSchema,
	currency: currencySchema
});

export const signupSchema = shopSettingsSchema.extend({
	ownerName: ownerNameSchema,
	email: emailSchema,
	password: newPasswordSchema
});
export type SignupInput = z.infer<typeof signupSchema>;
