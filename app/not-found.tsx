import Link from 'next/link';

export default function NotFound() {
  return (
    <div className="mx-auto max-w-md card text-center">
      <h1 className="mb-2">Nothing here</h1>
      <p className="text-ink-600">This page does not exist, or it is not public.</p>
      <p className="mt-4"><Link href="/">Back to the start</Link></p>
    </div>
  );
}
