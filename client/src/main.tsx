// Fonts: the weights and subsets the pages use, each fetched only when a page shows its characters.
import './fonts.css';
import './styles.css';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './app/App';
import { registerServiceWorker, startPhoneDownloads } from './features/field';

startPhoneDownloads();
registerServiceWorker();

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <App />
  </StrictMode>,
);
