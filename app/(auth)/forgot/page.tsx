import { JsonForm } from '@/components/forms/JsonForm';

export const metadata = { title: 'Reset your password' };

export default function ForgotPage() {
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-4">Reset your password</h1>
      <JsonForm action="/api/account/password-reset" fields={[{ name: 'email', label: 'E-mail', type: 'email', autoComplete: 'email' }]} submitLabel="Send reset link" />
    </div>
  );
}
