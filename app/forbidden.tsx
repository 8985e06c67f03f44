import Link from 'next/link';

export default function Forbidden() {
  return (
    <div className="mx-auto max-w-md card text-center" data-testid="forbidden">
      <h1 className="mb-2">Not for your role</h1>
      <p className="text-ink-600">Your account does not have the role this page needs. If you think it should, ask an admin.</p>
      <p className="mt-4"><Link href="/">Back to the start</Link></p>
    </div>
  );
}
