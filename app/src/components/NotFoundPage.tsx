import { Link } from 'react-router';
import { PageHeader } from './PageHeader';

export function NotFoundPage() {
  return (
    <div className="mx-auto max-w-xl px-6 py-16">
      <PageHeader title="Nothing at this address" lead="The page may have moved, or the link was mistyped." />
      <Link to="/projects" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
        Go to your projects
      </Link>
    </div>
  );
}
