/** Entry point of the interface: one API (IPC bridge or local web service) and the App. */
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './App.tsx';
import { createApi } from './api.ts';
import './styles.css';

const root = document.getElementById('root');
if (!root) throw new Error('index.html has no #root element');
createRoot(root).render(
  <StrictMode>
    <App api={createApi()} />
  </StrictMode>,
);
