// What a page or the API says while PostgreSQL does not answer (a restart, say). Shared by the
// server's error handling and the error pages, which recognise it and retry by themselves.
export const DATABASE_DOWN_MESSAGE = 'The database is not answering; retrying.';
/** Seconds between a waiting page's retries, and the Retry-After of a 503. */
export const DATABASE_RETRY_SECONDS = 5;
