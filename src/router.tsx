// The route table of the client (React Router 7 data router).
import { createBrowserRouter, Outlet } from 'react-router';
import { RequireAbility, RequireSignIn } from './auth/guards';
import { AppShell } from './components/AppShell';
import { RouteError } from './components/RouteError';
import { AccountPage } from './pages/account/AccountPage';
import { UsersPage } from './pages/admin/UsersPage';
import { HomePage } from './pages/home/HomePage';
import { InvitePage } from './pages/invite/InvitePage';
import { NotFoundPage } from './pages/NotFoundPage';
import { ComparePage } from './pages/objects/ComparePage';
import { ObjectPage } from './pages/objects/ObjectPage';
import { ObjectsPage } from './pages/objects/ObjectsPage';
import { RunPage } from './pages/runs/RunPage';
import { SignInPage } from './pages/signin/SignInPage';
import { BulletinPage } from './pages/bulletins/BulletinPage';
import { BulletinsPage } from './pages/bulletins/BulletinsPage';
import { StakeholderListsPage } from './pages/bulletins/StakeholderListsPage';
import { VersionPage } from './pages/bulletins/VersionPage';
import { BriefingPage } from './pages/briefings/BriefingPage';
import { BriefingsPage } from './pages/briefings/BriefingsPage';
import { ReleasePage } from './pages/releases/ReleasePage';
import { ReleasesPage } from './pages/releases/ReleasesPage';
import { ObservatoriesPage } from './pages/admin/ObservatoriesPage';
import { AstrometryPage } from './pages/astrometry/AstrometryPage';
import { FitPage } from './pages/fits/FitPage';
import { ObjectFitsPage } from './pages/fits/ObjectFitsPage';

export const router = createBrowserRouter([
  {
    element: <AppShell />,
    errorElement: <RouteError />,
    children: [
      { path: 'sign-in', element: <SignInPage /> },
      { path: 'invite/:token', element: <InvitePage /> },
      {
        element: <RequireSignIn />,
        children: [
          { index: true, element: <HomePage /> },
          { path: 'account', element: <AccountPage /> },
          {
            path: 'objects',
            element: (
              <RequireAbility action="read" subject="TrackedObject">
                <Outlet />
              </RequireAbility>
            ),
            children: [
              { index: true, element: <ObjectsPage /> },
              { path: ':id', element: <ObjectPage /> },
              { path: ':id/compare', element: <ComparePage /> },
              // orbit determination (issue 8)
              {
                path: ':id/astrometry',
                element: (
                  <RequireAbility action="read" subject="Astrometry">
                    <AstrometryPage />
                  </RequireAbility>
                ),
              },
              {
                path: ':id/fits',
                element: (
                  <RequireAbility action="read" subject="Fit">
                    <ObjectFitsPage />
                  </RequireAbility>
                ),
              },
            ],
          },
          {
            path: 'fits/:id',
            element: (
              <RequireAbility action="read" subject="Fit">
                <FitPage />
              </RequireAbility>
            ),
          },
          {
            path: 'observatories',
            element: (
              <RequireAbility action="read" subject="Observatory">
                <ObservatoriesPage />
              </RequireAbility>
            ),
          },
          {
            path: 'runs/:id',
            element: (
              <RequireAbility action="read" subject="Run">
                <RunPage />
              </RequireAbility>
            ),
          },
          {
            path: 'bulletins',
            element: (
              <RequireAbility action="read" subject="Bulletin">
                <Outlet />
              </RequireAbility>
            ),
            children: [
              { index: true, element: <BulletinsPage /> },
              { path: ':id', element: <BulletinPage /> },
              { path: ':id/versions/:version', element: <VersionPage /> },
            ],
          },
          {
            path: 'releases',
            element: (
              <RequireAbility action="read" subject="Release">
                <Outlet />
              </RequireAbility>
            ),
            children: [
              { index: true, element: <ReleasesPage /> },
              { path: ':id', element: <ReleasePage /> },
            ],
          },
          {
            path: 'stakeholder-lists',
            element: (
              <RequireAbility action="read" subject="StakeholderList">
                <StakeholderListsPage />
              </RequireAbility>
            ),
          },
          {
            path: 'briefings',
            element: (
              <RequireAbility action="read" subject="Briefing">
                <Outlet />
              </RequireAbility>
            ),
            children: [
              { index: true, element: <BriefingsPage /> },
              { path: ':id', element: <BriefingPage /> },
            ],
          },
          {
            path: 'admin/users',
            element: (
              <RequireAbility action="read" subject="User">
                <UsersPage />
              </RequireAbility>
            ),
          },
        ],
      },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
