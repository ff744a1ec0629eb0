import type { IconName } from '../components/Icon';
import type { Permission } from '../../shared/roles';

export interface NavItem {
  to: string;
  label: string;
  icon: IconName;
  permission: Permission;
  /** Match the path exactly (the overview at `/`). */
  end?: boolean;
}

export interface NavGroup {
  label: string;
  items: NavItem[];
}

/** The sidebar. Items the signed-in user's roles may not use are not shown; the server refuses them anyway. */
export const NAVIGATION: NavGroup[] = [
  {
    label: 'Review',
    items: [
      { to: '/', label: 'Overview', icon: 'overview', permission: 'design.read', end: true },
      { to: '/blocks', label: 'Blocks', icon: 'blocks', permission: 'design.read' },
      { to: '/waivers', label: 'Waivers', icon: 'waivers', permission: 'design.read' },
    ],
  },
  {
    label: 'Methodology',
    items: [{ to: '/decks', label: 'Rule decks', icon: 'decks', permission: 'design.read' }],
  },
  {
    label: 'Administration',
    items: [
      { to: '/admin/users', label: 'Users & invitations', icon: 'users', permission: 'user.manage' },
      { to: '/admin/outbox', label: 'Outbox', icon: 'outbox', permission: 'outbox.read' },
    ],
  },
];

export const ACCOUNT_NAVIGATION: NavItem[] = [{ to: '/settings/tokens', label: 'API tokens', icon: 'key', permission: 'token.manage' }];
