import type React from 'react';
import type { RouteObject } from 'react-router';
import { OutboxMessagePage } from '../features/admin/OutboxMessagePage';
import { OutboxPage } from '../features/admin/OutboxPage';
import { UsersPage } from '../features/admin/UsersPage';
import { AcceptInvitePage } from '../features/auth/AcceptInvitePage';
import { ResetPasswordPage } from '../features/auth/ResetPasswordPage';
import { SignInPage } from '../features/auth/SignInPage';
import { BlockPage } from '../features/blocks/BlockPage';
import { BlocksPage } from '../features/blocks/BlocksPage';
import { NotFoundPage } from '../features/errors/NotFoundPage';
import { RouteError } from '../features/errors/RouteError';
import { HomePage } from '../features/home/HomePage';
import { TokensPage } from '../features/tokens/TokensPage';
import { WaiverPage } from '../features/waivers/WaiverPage';
import { WaiversPage } from '../features/waivers/WaiversPage';
import { Loading } from '../components/LoadState';
import { RequirePermission, RequireSession } from './guards';
import { Shell } from './Shell';

// The heaviest pages load on first visit: the deck editor carries every rule's parameter schema,
// the run page the editor view and the plots, so the sign-in page and the shell stay light.
const decks = () => import('../features/decks/DecksPage');
const lazyPage = <M,>(load: () => Promise<M>, pick: (m: M) => React.ComponentType) => async () => ({ Component: pick(await load()) });

/** Every address of the client. Later features add their pages here, under the shell. */
export const routes: RouteObject[] = [
  {
    errorElement: <RouteError />,
    hydrateFallbackElement: <Loading />,
    children: [
      { path: '/sign-in', element: <SignInPage /> },
      { path: '/reset-password', element: <ResetPasswordPage /> },
      { path: '/accept-invite', element: <AcceptInvitePage /> },
      {
        element: <RequireSession />,
        children: [
          {
            element: <Shell />,
            children: [
              {
                errorElement: <RouteError />,
                children: [
                  { index: true, element: <HomePage /> },
                  { path: 'blocks', element: <BlocksPage /> },
                  { path: 'blocks/:blockId', element: <BlockPage /> },
                  { path: 'runs/:runId', lazy: lazyPage(() => import('../features/runs/RunPage'), (m) => m.RunPage) },
                  { path: 'runs/:runId/report', lazy: lazyPage(() => import('../features/reports/ReviewReportPage'), (m) => m.ReviewReportPage) },
                  { path: 'decks', lazy: lazyPage(decks, (m) => m.DecksPage) },
                  { path: 'decks/:deckId', lazy: lazyPage(decks, (m) => m.DeckPage) },
                  { path: 'decks/:deckId/versions/:versionId', lazy: lazyPage(decks, (m) => m.DeckVersionPage) },
                  { path: 'waivers', element: <WaiversPage /> },
                  { path: 'waivers/:waiverId', element: <WaiverPage /> },
                  { path: 'admin/users', element: <RequirePermission permission="user.manage"><UsersPage /></RequirePermission> },
                  { path: 'admin/outbox', element: <RequirePermission permission="outbox.read"><OutboxPage /></RequirePermission> },
                  { path: 'admin/outbox/:messageId', element: <RequirePermission permission="outbox.read"><OutboxMessagePage /></RequirePermission> },
                  { path: 'settings/tokens', element: <RequirePermission permission="token.manage"><TokensPage /></RequirePermission> },
                  { path: '*', element: <NotFoundPage /> },
                ],
              },
            ],
          },
        ],
      },
    ],
  },
];
