import { ApiError } from '../lib/api';
import { Button } from './Button';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <p role="status" className="flex items-center gap-2 py-3 text-note text-wafer-500">
      <span aria-hidden="true" className="inline-block h-3 w-3 animate-spin rounded-full border-2 border-wafer-300 border-t-phosphor-600" />
      {label}
    </p>
  );
}

export function QueryError({ error, onRetry, what = 'this' }: { error: unknown; onRetry?: () => void; what?: string }) {
  const message = error instanceof ApiError ? error.message : 'Something went wrong.';
  return (
    <div role="alert" className="flex flex-wrap items-center gap-3 rounded-md border border-garnet-300 bg-garnet-50 px-3 py-2 text-note text-garnet-700">
      <span>
        Could not load {what}. {message}
      </span>
      {onRetry && (
        <Button variant="secondary" onClick={onRetry}>
          Try again
        </Button>
      )}
    </div>
  );
}
