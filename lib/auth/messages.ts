/** Sentences for the sign-in error codes; none of them tells whether an e-mail has an account. */
export const SIGN_IN_ERRORS: Record<string, string> = {
  CredentialsSignin: 'That e-mail and password do not match. Check both, or reset your password.',
  EmailNotVerified: 'Confirm your e-mail first: open the link we sent when you signed up.',
  TooManyAttempts: 'Too many failed sign-ins from here. Wait a few minutes and try again, or reset your password: the e-mailed link always works.',
  SessionRequired: 'Sign in to continue.',
};
export const signInError = (code: string | null | undefined) =>
  code ? (SIGN_IN_ERRORS[code] ?? 'Sign-in failed. Try again.') : null;

export const tooManyMessage = (retryAfterS: number) => {
  const min = Math.max(1, Math.ceil(retryAfterS / 60));
  return `Too many failed sign-ins. Wait ${min} minute${min > 1 ? 's' : ''} and try again, or reset your password: the e-mailed link always works.`;
};
