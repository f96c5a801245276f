// Entry of the renderer: a store, the controller over the preload's API, the window.
import { createRoot } from 'react-dom/client';
import { App } from './App';
import { getApi } from './api';
import { Controller } from './controller';
import { createStore } from './state/store';
import './styles.css';

const root = document.getElementById('root')!;
const api = getApi();
if (!api) {
  root.textContent = 'Hingeplan’s window was opened without its bridge to the main process; start it with `npm start`.';
} else {
  const controller = new Controller(api, createStore());
  controller.start();
  createRoot(root).render(<App controller={controller} />);
  void controller.startup();
  // the browser harness and the frame-rate measurement reach the store through this handle
  (window as unknown as { __hingeplan?: Controller }).__hingeplan = controller;
}
