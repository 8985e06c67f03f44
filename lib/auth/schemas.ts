/** Account inputs: one schema each, shared by the forms and the route handlers. */
import { z } from 'zod';
import { PASSWORD_MIN_LENGTH, RoleSchema } from '@/lib/domain';
import { passwordWeakness } from '@/lib/auth/passwordStrength';

export const EmailSchema = z
  .string({ error: 'Enter your e-mail address.' })
  .trim()
  .min(1, 'Enter your e-mail address.')
  .max(254, 'That e-mail address is too long.')
  .pipe(z.email({ error: 'Enter an e-mail address like name@example.org.' }))
  .transform((e) => e.toLowerCase());

/** Length first (cheap), then common and guessable passwords are refused with zxcvbn's reason. */
export const PasswordSchema = z
  .string({ error: 'Choose a password.' })
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters.`)
  .max(200, 'Use at most 200 characters.')
  .superRefine((password, ctx) => {
    const weakness = passwordWeakness(password);
    if (weakness) ctx.addIssue({ code: 'custom', message: weakness });
  });

export const SignUpSchema = z
  .object({
    name: z.string({ error: 'Tell us what to call you.' }).trim().min(2, 'Use at least 2 characters.').max(80, 'Use at most 80 characters.'),
    email: EmailSchema,
    password: PasswordSchema,
  })
  .superRefine((v, ctx) => {
    // A password made of the person's own name or address is guessed first.
    const weakness = passwordWeakness(v.password, [...v.name.split(/\s+/), v.email, ...v.email.split('@')[0].split(/[.\-_+]/)]);
    if (weakness) ctx.addIssue({ code: 'custom', path: ['password'], message: weakness });
  });
export type SignUpInput = z.infer<typeof SignUpSchema>;

export const TokenSchema = z.string({ error: 'The link is incomplete.' }).regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not valid. Copy the whole link from the e-mail.');

export const VerifySchema = z.object({ token: TokenSchema });
export const ResetRequestSchema = z.object({ email: EmailSchema });
export const ResetConfirmSchema = z.object({ token: TokenSchema, password: PasswordSchema });

export const RolesUpdateSchema = z.object({
  roles: z.array(RoleSchema, { error: 'Choose roles from the list.' }).max(4),
});
