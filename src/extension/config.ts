/**
 * Every `slopewise.*` setting, typed and sanitised in one place. The rest of the extension reads
 * settings only through `Config`; a value a user mistyped in settings.json falls back to the
 * default instead of reaching the core.
 */
import * as vscode from 'vscode';
import { FLOAT_TYPES, RULES, type FloatType, type RuleId } from '../core/types';
import { LIMITS } from '../core/limits';

export const SECTION = 'slopewise';

export type CheckWhen = 'onType' | 'onSave' | 'manual';
export type RuleSeverity = 'error' | 'warning' | 'information' | 'hint' | 'off';

/** VS Code language ids Slopewise reads by default (also the manifest's activation languages). */
export const DEFAULT_LANGUAGES: readonly string[] = [
  'python', 'c', 'cpp', 'cuda-cpp', 'rust', 'go', 'julia', 'r', 'matlab', 'fortran', 'fortran-modern',
  'javascript', 'typescript', 'java', 'kotlin', 'lua', 'plaintext', 'markdown', 'latex',
];

const DEFAULT_SEVERITY: Record<RuleId, RuleSeverity> = {
  'derivative-mismatch': 'error',
  'formula-mismatch': 'error',
  'unstable-form': 'warning',
  'vanishing-pair': 'warning',
};

const SEVERITIES: readonly RuleSeverity[] = ['error', 'warning', 'information', 'hint', 'off'];

/** Pure sanitisers, exported for unit tests. */
export const sanitize = {
  number(v: unknown, dflt: number, min: number, max: number): number {
    return typeof v === 'number' && Number.isFinite(v) && v >= min && v <= max ? v : dflt;
  },
  floatTypes(v: unknown): FloatType[] {
    if (!Array.isArray(v)) return [...FLOAT_TYPES];
    const picked = FLOAT_TYPES.filter((t) => v.includes(t));
    return picked.length > 0 ? picked : [...FLOAT_TYPES];
  },
  domain(v: unknown): [number, number] {
    if (Array.isArray(v) && v.length === 2) {
      const [a, b] = v as unknown[];
      if (typeof a === 'number' && typeof b === 'number' && Number.isFinite(a) && Number.isFinite(b) && a < b
          && b - a <= 1e6) {
        return [a, b];
      }
    }
    return [-6, 6];
  },
  languages(v: unknown): string[] {
    if (!Array.isArray(v)) return [...DEFAULT_LANGUAGES];
    return v.filter((s): s is string => typeof s === 'string' && /^[\w.+-]{1,40}$/.test(s));
  },
  checkWhen(v: unknown): CheckWhen {
    return v === 'onSave' || v === 'manual' || v === 'onType' ? v : 'onType';
  },
  severities(v: unknown): Record<RuleId, RuleSeverity> {
    const out = { ...DEFAULT_SEVERITY };
    if (v && typeof v === 'object') {
      for (const rule of RULES) {
        const s = (v as Record<string, unknown>)[rule];
        if (typeof s === 'string' && (SEVERITIES as readonly string[]).includes(s)) out[rule] = s as RuleSeverity;
      }
    }
    return out;
  },
  floatType(v: unknown): FloatType {
    return (FLOAT_TYPES as readonly unknown[]).includes(v) ? (v as FloatType) : 'float16';
  },
};

/** A snapshot of the settings for one scope; take a fresh one with `Config.read()` after a change. */
export class Config {
  readonly saturationThreshold: number;
  readonly floatTypes: FloatType[];
  readonly plotDomain: [number, number];
  readonly plotFloatType: FloatType;
  readonly plotSamples: number;
  readonly languages: string[];
  readonly checkWhen: CheckWhen;
  readonly debounceMs: number;
  readonly severities: Record<RuleId, RuleSeverity>;
  readonly hoverEnabled: boolean;
  readonly maxFileBytes: number;
  readonly maxFormulasPerFile: number;
  readonly workspaceMaxFiles: number;

  private constructor(get: <T>(key: string) => T | undefined) {
    this.saturationThreshold = sanitize.number(get('saturationThreshold'), 0.01, 1e-12, 0.5);
    this.floatTypes = sanitize.floatTypes(get('floatTypes'));
    this.plotDomain = sanitize.domain(get('plot.domain'));
    this.plotFloatType = sanitize.floatType(get('plot.floatType'));
    this.plotSamples = Math.round(sanitize.number(get('plot.samples'), 400, 50, 4000));
    this.languages = sanitize.languages(get('languages'));
    this.checkWhen = sanitize.checkWhen(get('checkWhen'));
    this.debounceMs = Math.round(sanitize.number(get('debounceMs'), 400, 50, 10_000));
    this.severities = sanitize.severities(get('severity'));
    this.hoverEnabled = get('hover.enabled') !== false;
    // Settings may lower the core's limits, never raise them.
    this.maxFileBytes = Math.round(sanitize.number(get('limits.maxFileBytes'), LIMITS.maxFileBytes, 1_000, LIMITS.maxFileBytes));
    this.maxFormulasPerFile = Math.round(
      sanitize.number(get('limits.maxFormulasPerFile'), LIMITS.maxFormulasPerFile, 1, LIMITS.maxFormulasPerFile));
    this.workspaceMaxFiles = Math.round(sanitize.number(get('limits.workspaceMaxFiles'), 2_000, 1, 50_000));
  }

  static read(scope?: vscode.ConfigurationScope): Config {
    const c = vscode.workspace.getConfiguration(SECTION, scope);
    return new Config((key) => c.get(key));
  }

  /** For tests: a Config from plain values, as if read from settings.json. */
  static from(values: Record<string, unknown>): Config {
    return new Config(<T>(key: string) => values[key] as T | undefined);
  }

  isLanguageEnabled(languageId: string): boolean {
    return this.languages.includes(languageId);
  }
}
