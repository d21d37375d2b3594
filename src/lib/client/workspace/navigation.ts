import { create } from 'zustand';

/**
 * Which workspace screen is shown. The tab bar sets it; the controller moves it when a step is finished (a run that
 * ends on the Recipe screen goes on to Maps), and only from the screen the person is still on.
 */
export const useScreen = create<{ active: string; show: (name: string, from?: string) => void }>((set, get) => ({
  active: 'Source',
  show: (name, from) => {
    if (from === undefined || get().active === from) set({ active: name });
  },
}));
