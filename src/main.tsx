import '@fontsource/ibm-plex-sans/400.css';
import '@fontsource/ibm-plex-sans/400-italic.css';
import '@fontsource/ibm-plex-sans/500.css';
import '@fontsource/ibm-plex-sans/600.css';
import '@fontsource/ibm-plex-mono/400.css';
import '@fontsource/ibm-plex-mono/500.css';
import './styles.css';

import { createRoot } from 'react-dom/client';
import { App, createClient } from './app/App';
import { routes } from './app/routes';

const { queryClient, router } = createClient(routes);
createRoot(document.getElementById('root')!).render(<App queryClient={queryClient} router={router} />);
