import { Link } from 'react-router';
import { useMe } from '../features/auth/me';
import { PageHeader } from './PageHeader';
import { usePageTitle } from './pageTitle';

/** Shown inside the app frame (header and footer) for signed-in and signed-out visitors alike. */
export function NotFoundPage() {
  const me = useMe();
  usePageTitle('Page not found');
  return (
    <div className="max-w-xl py-6">
      <PageHeader title="Nothing at this address" lead="The page may have moved, or the link was mistyped." />
      {me.data ? (
        <Link to="/projects" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Go to your projects
        </Link>
      ) : (
        <Link to="/sign-in" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Sign in to reach your projects
        </Link>
      )}
    </div>
  );
}
