/** React binding of the store: `useApp(s => s.status)` re-renders when the selected value changes. */
import { useStore } from 'zustand';
import { type AppState, appStore } from './store';

export function useApp<T>(selector: (state: AppState) => T): T {
  return useStore(appStore, selector);
}
