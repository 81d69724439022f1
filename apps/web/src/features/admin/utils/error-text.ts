import { ApiError } from '@/lib/api-error';

/** The API's own words for a refused action, for a toast. */
export function errorDetail(error: unknown): string {
  return error instanceof ApiError ? (error.detail ?? error.title) : 'The action could not be completed.';
}
