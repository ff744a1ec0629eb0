// Keepwell's small line icons (16 px grid, 1.5 px stroke), drawn for the navigation.

const paths = {
  overview: 'M2.5 2.5h4.5v4.5H2.5zM9 2.5h4.5v3H9zM9 7.5h4.5v6H9zM2.5 9h4.5v4.5H2.5z',
  blocks: 'M4.5 4.5h7v7h-7zM6.5 2v2.5M9.5 2v2.5M6.5 11.5V14M9.5 11.5V14M2 6.5h2.5M2 9.5h2.5M11.5 6.5H14M11.5 9.5H14',
  waivers: 'M8 1.8 13 3.8v3.6c0 3-2.1 5.4-5 6.8-2.9-1.4-5-3.8-5-6.8V3.8zM5.6 8l1.7 1.7L10.6 6.4',
  decks: 'M4.5 4.5h9v9h-9zM2.5 11.5V2.5h9M7 8h4M7 10.5h2.5',
  users: 'M6 7.5a2.5 2.5 0 1 0 0-5 2.5 2.5 0 0 0 0 5zM1.8 13.5c.5-2.4 2.2-3.8 4.2-3.8s3.7 1.4 4.2 3.8M10.5 2.8a2.3 2.3 0 0 1 0 4.4M12 9.9c1.1.5 1.9 1.7 2.2 3.6',
  outbox: 'M2 9.5h3.2l1 1.8h3.6l1-1.8H14M2 9.5l1.6-6h8.8l1.6 6v4H2zM8 3.8v3.7M6.4 5.9 8 7.5l1.6-1.6',
  key: 'M5.5 10.5a3 3 0 1 0 0-6 3 3 0 0 0 0 6zM8.5 7.5H14v2.5M12 7.5v2',
  signOut: 'M6.5 2.5h-3v11h3M10 5l3 3-3 3M13 8H6.5',
  plus: 'M8 3v10M3 8h10',
  mail: 'M2.5 3.5h11v9h-11zM2.8 3.8 8 8.2l5.2-4.4',
  back: 'M10 3 5 8l5 5',
} as const;

export type IconName = keyof typeof paths;

export function Icon({ name, className = 'size-4' }: { name: IconName; className?: string }) {
  return (
    <svg viewBox="0 0 16 16" className={className} aria-hidden="true" focusable="false" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round">
      <path d={paths[name]} />
    </svg>
  );
}
