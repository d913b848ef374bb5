import { z } from 'zod';
import { text } from './text';
import { ROLES } from '$lib/measurements';
import { emailSchema } from './auth';

export const roleSchema = z.enum(ROLES, { message: 'Choose a role: owner, engineer, machinist or viewer.' });
export const inviteSchema = z.object({ email: emailSchema, role: roleSchema });
export const changeRoleSchema = z.object({ userId: text('userId').min(1).max(64), role: roleSchema });
export const memberSchema = z.object({ userId: text('userId').min(1).max(64) });
export const idSchema = z.object({ id: z.uuid({ message: 'Unknown item.' }) });

export const tokenSchema = z.object({
	name: text().trim().min(1, 'Give the token a name.').max(80, 'At most 80 characters.'),
	expiresInDays: z.enum(['0', '30', '90', '365']).default('90')
});
