/** Entry point of the workbench: mount the app, start the engine worker, open the demo workspace. */
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { App } from './App.tsx';
import { loadDemoWorkspace, startEngine } from './store/actions.ts';
import './styles.css';

const root = document.getElementById('root');
if (root === null) throw new Error('index.html has no #root element');
createRoot(root).render(
  <StrictMode>
    <App />
  </StrictMode>,
);

// The engine starts once per page (not per render); the demo opens as soon as it is up.
void startEngine()
  .then(() => loadDemoWorkspace())
  .catch(() => undefined);
