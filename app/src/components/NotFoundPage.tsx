import { Link } from 'react-router';
import { PageHeader } from './PageHeader';
import { Wordmark } from './Wordmark';

export function NotFoundPage() {
  return (
    <main id="main" className="mx-auto max-w-xl px-6 py-16">
      <Link to="/projects" aria-label="Tetrawell, your projects" className="mb-10 inline-block rounded-md">
        <Wordmark tone="light" />
      </Link>
      <PageHeader title="Nothing at this address" lead="The page may have moved, or the link was mistyped." />
      <Link to="/projects" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
        Go to your projects
      </Link>
    </main>
  );
}
