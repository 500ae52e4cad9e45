/**
 * The preload script of the desktop app (runs sandboxed, with context isolation): exposes the API of
 * app/shared/contract.ts as `window.shadowfront` over IPC, and nothing else.
 */
import { contextBridge, ipcRenderer } from 'electron';
import { buildBridge } from './bridge.ts';

contextBridge.exposeInMainWorld(
  'shadowfront',
  buildBridge((channel, arg) => ipcRenderer.invoke(channel, arg)),
);
