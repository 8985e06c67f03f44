/** Pages show Next's 404 page for an unknown or malformed id instead of an error page. */
import { notFound } from 'next/navigation';
import { HttpError } from '@/lib/errors';

export async function loadOr404<T>(p: Promise<T>): Promise<T> {
  try {
    return await p;
  } catch (err) {
    if (err instanceof HttpError && (err.status === 404 || err.status === 400)) notFound();
    throw err;
  }
}
