/**
 * For server-rendered pages: await a use case and show Next's not-found page when it answers 404 (or one
 * of the given statuses), as the API answers 404 for another workshop's record. Any other error is rethrown.
 */
import { notFound } from 'next/navigation';
import { AppError } from './errors';

export async function orNotFound<T>(work: Promise<T>, statuses: readonly number[] = [404]): Promise<T> {
  try {
    return await work;
  } catch (e) {
    if (e instanceof AppError && statuses.includes(e.status)) notFound();
    throw e;
  }
}
