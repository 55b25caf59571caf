import { DOCUMENT, Injectable, inject, signal } from '@angular/core';

export type ThemeChoice = 'system' | 'light' | 'dark';

const STORAGE_KEY = 'proofline.theme';
const ORDER: readonly ThemeChoice[] = ['system', 'light', 'dark'];

/** Light, dark or the system's setting, remembered in this browser. */
@Injectable({ providedIn: 'root' })
export class ThemePreference {
  private readonly document = inject(DOCUMENT);
  private readonly current = signal<ThemeChoice>(this.stored());

  readonly choice = this.current.asReadonly();

  constructor() {
    this.apply(this.current());
  }

  /** Steps system, light, dark, system... */
  next(): void {
    const choice = ORDER[(ORDER.indexOf(this.current()) + 1) % ORDER.length] ?? 'system';
    this.current.set(choice);
    this.document.defaultView?.localStorage.setItem(STORAGE_KEY, choice);
    this.apply(choice);
  }

  private apply(choice: ThemeChoice): void {
    const classes = this.document.documentElement.classList;
    classes.toggle('theme-light', choice === 'light');
    classes.toggle('theme-dark', choice === 'dark');
  }

  private stored(): ThemeChoice {
    const value = this.document.defaultView?.localStorage.getItem(STORAGE_KEY);
    return ORDER.find((choice) => choice === value) ?? 'system';
  }
}
