/** React binding of the load store (mapping step, how the snapshot on screen was loaded). */
import { useStore } from 'zustand';
import { type LoadState, loadStore } from '../../state/loadActions';

export function useLoad<T>(selector: (state: LoadState) => T): T {
  return useStore(loadStore, selector);
}
