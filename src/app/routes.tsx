import type { RouteObject } from 'react-router';
import { OutboxMessagePage } from '../features/admin/OutboxMessagePage';
import { OutboxPage } from '../features/admin/OutboxPage';
import { UsersPage } from '../features/admin/UsersPage';
import { AcceptInvitePage } from '../features/auth/AcceptInvitePage';
import { ResetPasswordPage } from '../features/auth/ResetPasswordPage';
import { SignInPage } from '../features/auth/SignInPage';
import { BlockPage } from '../features/blocks/BlockPage';
import { BlocksPage } from '../features/blocks/BlocksPage';
import { DeckPage, DecksPage, DeckVersionPage } from '../features/decks/DecksPage';
import { NotFoundPage } from '../features/errors/NotFoundPage';
import { RouteError } from '../features/errors/RouteError';
import { HomePage } from '../features/home/HomePage';
import { ReviewReportPage } from '../features/reports/ReviewReportPage';
import { RunPage } from '../features/runs/RunPage';
import { TokensPage } from '../features/tokens/TokensPage';
import { WaiverPage } from '../features/waivers/WaiverPage';
import { WaiversPage } from '../features/waivers/WaiversPage';
import { RequirePermission, RequireSession } from './guards';
import { Shell } from './Shell';

/** Every address of the client. Later features add their pages here, under the shell. */
export const routes: RouteObject[] = [
  {
    errorElement: <RouteError />,
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
                  { path: 'runs/:runId', element: <RunPage /> },
                  { path: 'runs/:runId/report', element: <ReviewReportPage /> },
                  { path: 'decks', element: <DecksPage /> },
                  { path: 'decks/:deckId', element: <DeckPage /> },
                  { path: 'decks/:deckId/versions/:versionId', element: <DeckVersionPage /> },
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
