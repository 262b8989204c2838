import { lazy, Suspense } from 'react';
import { createBrowserRouter, Navigate } from 'react-router';
import { Loading } from './components/QueryState';
import { AppShell } from './components/AppShell';
import { NotFoundPage } from './components/NotFoundPage';
import { AccountPage } from './features/account/AccountPage';
import { MailRoomPage } from './features/admin/MailRoomPage';
import { RequireSession } from './features/auth/RequireSession';
import { ResetConfirmPage } from './features/auth/ResetConfirmPage';
import { ResetRequestPage } from './features/auth/ResetRequestPage';
import { SignInPage } from './features/auth/SignInPage';
import { SignUpPage } from './features/auth/SignUpPage';
import { VerifyEmailPage } from './features/auth/VerifyEmailPage';
import { AcceptInvitationPage } from './features/invitations/AcceptInvitationPage';
import { ProjectListPage } from './features/projects/ProjectListPage';
import { ProjectPage } from './features/projects/ProjectPage';

// The design workspace carries three.js: a lazy route, so its chunk loads only there.
const WorkspacePage = lazy(() => import('./features/studio/WorkspacePage'));

/**
 * Routes. A route whose page should fill the frame edge to edge (the design workspace) sets
 * `handle: { fullBleed: true }`; AppShell then drops the page padding and width limit.
 * The paths /invite/:token, /reset/:token, /verify/:token, /sign-in and /reset are also
 * written into e-mails by the server, so they must not change without changing the mail templates.
 */
export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInPage /> },
  { path: '/sign-up', element: <SignUpPage /> },
  { path: '/reset', element: <ResetRequestPage /> },
  { path: '/reset/:token', element: <ResetConfirmPage /> },
  // The e-mailed sign-up confirmation link: signs in, then returns to where sign-up started.
  { path: '/verify/:token', element: <VerifyEmailPage /> },
  // Readable signed out: the page itself offers sign-in or sign-up and comes back.
  { path: '/invite/:token', element: <AcceptInvitationPage /> },
  {
    element: <RequireSession />,
    children: [
      {
        element: <AppShell />,
        children: [
          { index: true, element: <Navigate to="/projects" replace /> },
          { path: '/projects', element: <ProjectListPage /> },
          { path: '/projects/:projectId', element: <ProjectPage /> },
          {
            path: '/projects/:projectId/designs/:designId',
            handle: { fullBleed: true },
            element: (
              <Suspense fallback={<Loading label="Opening the design workspace…" />}>
                <WorkspacePage />
              </Suspense>
            ),
          },
          { path: '/account', element: <AccountPage /> },
          { path: '/admin/mail', element: <MailRoomPage /> },
        ],
      },
    ],
  },
  // Unknown addresses keep the frame (header with the trail, footer) whether or not anyone is signed in.
  { element: <AppShell />, children: [{ path: '*', element: <NotFoundPage /> }] },
]);
