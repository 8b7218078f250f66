// Theme classes on <html>: Ionic's class palettes (dark, high contrast, and both), chosen by the
// person or following the phone (field-traps ). "system" listens to prefers-color-scheme.
import type { AppSettings } from './settings/app-settings.ts';

export function applyTheme(settings: Pick<AppSettings, 'theme' | 'highContrast'>, root: HTMLElement = document.documentElement): () => void {
  const media = window.matchMedia('(prefers-color-scheme: dark)');
  const paint = () => {
    const dark = settings.theme === 'dark' || (settings.theme === 'system' && media.matches);
    root.classList.toggle('ion-palette-dark', dark);
    root.classList.toggle('ion-palette-high-contrast', settings.highContrast);
    root.dataset.theme = `${dark ? 'dark' : 'light'}${settings.highContrast ? '-high-contrast' : ''}`;
  };
  paint();
  if (settings.theme !== 'system') return () => undefined;
  media.addEventListener('change', paint);
  return () => media.removeEventListener('change', paint);
}
