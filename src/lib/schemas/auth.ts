import { z } from 'zod';

export const ROLE_VALUES = ['admin', 'engineer', 'technician', 'viewer'] as const;
export const roleSchema = z.enum(ROLE_VALUES, { error: 'Choose a role: admin, engineer, technician or viewer.' });

export const emailSchema = z
	.string({ error: 'Enter an e-mail address.' })
	.trim()
	.min(1, 'Enter an e-mail address.')
	.max(254, 'An e-mail address has at most 254 characters.')
	.pipe(z.email({ error: 'Enter a valid e-mail address, like name@example.com.' }));

export const passwordSchema = z
	.string({ error: 'Enter a password.' })
	.min(10, 'Use at least 10 characters.')
	.max(200, 'Use at most 200 characters.');

export const personNameSchema = z
	.string({ error: 'Enter your name.' })
	.trim()
	.min(1, 'Enter your name.')
	.max(100, 'A name has at most 100 characters.');

export const organisationNameSchema = z
	.string({ error: 'Enter the organisation name.' })
	.trim()
	.min(2, 'Enter the organisation name (at least 2 characters).')
	.max(120, 'An organisation name has at most 120 characters.');

export const signUpSchema = z.object({
	organisationName: organisationNameSchema,
	name: personNameSchema,
	email: emailSchema,
	password: passwordSchema
});

export const signInSchema = z.object({
	email: emailSchema,
	password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(200)
});

export const forgotSchema = z.object({ email: emailSchema });

export const resetSchema = z
	.object({ password: passwordSchema, confirm: z.string() })
	.refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export const acceptInviteSchema = z.object({
	name: personNameSchema.optional(),
	password: z.string({ error: 'Enter a password.' }).min(1, 'Enter a password.').max(200)
});

export const invitationCreateSchema = z.object({ email: emailSchema, role: roleSchema });
export const memberRoleSchema = z.object({ role: roleSchema });
export const organisationUpdateSchema = z.object({ name: organisationNameSchema });
