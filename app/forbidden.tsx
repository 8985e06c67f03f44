import Link from 'next/link';
import { refusalReason } from '@/components/refusal';

export default function Forbidden() {
  const reason = refusalReason();
  return (
    <div className="mx-auto max-w-md card text-center" data-testid="forbidden">
      {reason ? (
        <>
          <h1 className="mb-2">Not open to you</h1>
          <p className="text-ink-600" data-testid="forbidden-reason">{reason}</p>
        </>
      ) : (
        <>
          <h1 className="mb-2">Not for your role</h1>
          <p className="text-ink-600">Your account does not have the role this page needs. If you think it should, ask an admin.</p>
        </>
      )}
      <p className="mt-4"><Link href="/">Back to the start</Link></p>
    </div>
  );
}
