/**
 * Findings as a SARIF 2.1.0 log (OASIS Static Analysis Results Interchange Format), so that
 * code-scanning services can show them. One run, one tool (`slopewise`), the four rules with their
 * default levels, each result with its region, related location (the forward), and a fix as an
 * artifact change when one is known. Files that could not be read become tool execution
 * notifications of the invocation.
 */
import { RULES, type RuleId } from './types';
import type { FindingRecord, Problem } from './report';

export const SARIF_SCHEMA = 'https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json';

const RULE_TEXT: Record<RuleId, { short: string; full: string; level: 'error' | 'warning' }> = {
  'derivative-mismatch': {
    short: 'A hand-written derivative disagrees with its forward.',
    full: 'The derivative (in code or in a comment) was compared numerically with the exact derivative of the forward it belongs to, at many points away from kinks, and differs beyond the tolerance.',
    level: 'error',
  },
  'formula-mismatch': {
    short: 'A formula in a comment disagrees with the code it documents.',
    full: 'The formula written in the comment or docstring computes different values from the code of the function under it.',
    level: 'error',
  },
  'unstable-form': {
    short: 'A float breakdown with a known stable rewrite.',
    full: 'Evaluated one operation at a time in float16, bfloat16 or float32, the expression overflows, returns NaN or loses its value where the exact result is representable; an equivalent stable form exists.',
    level: 'warning',
  },
  'vanishing-pair': {
    short: 'An activation–loss pairing that starves the gradient.',
    full: 'The loss applied to this activation has a gradient that vanishes where the loss is large (for example sigmoid output into squared error).',
    level: 'warning',
  },
};

export interface SarifOptions {
  toolVersion: string;
  /** Wall-clock times are not part of the log, so the output is reproducible. */
  informationUri?: string;
}

type Json = Record<string, unknown>;

function region(r: { line: number; column: number; endLine: number; endColumn: number }): Json {
  const out: Json = { startLine: r.line, startColumn: r.column };
  if (r.endLine > r.line || (r.endLine === r.line && r.endColumn > r.column)) {
    out.endLine = r.endLine;
    out.endColumn = r.endColumn;
  }
  return out;
}

/** A relative or absolute path → a URI reference (forward slashes, spaces and `%` escaped). */
export function pathToUri(path: string): string {
  const p = path.replace(/\\/g, '/');
  const enc = p.split('/').map((seg) => encodeURIComponent(seg).replace(/%3A/gi, ':')).join('/');
  if (/^[A-Za-z]:\//.test(p)) return `file:///${enc}`;
  if (p.startsWith('/')) return `file://${enc}`;
  return enc;
}

export function toSarif(findings: readonly FindingRecord[], problems: readonly Problem[], opts: SarifOptions): Json {
  const ruleIndex = new Map<RuleId, number>();
  RULES.forEach((r, i) => ruleIndex.set(r, i));
  const results = findings.map((f) => {
    const location = { physicalLocation: { artifactLocation: { uri: pathToUri(f.file) }, region: region(f) } };
    const text = [f.message, f.expected !== undefined ? `Expected: ${f.expected}.` : '', f.found !== undefined ? `Found: ${f.found}.` : ''].filter((s) => s).join(' ');
    const r: Json = {
      ruleId: f.rule,
      ruleIndex: ruleIndex.get(f.rule),
      level: f.severity === 'info' ? 'note' : f.severity,
      message: { text },
      locations: [location],
    };
    if (f.related) {
      r.relatedLocations = [{
        id: 1,
        physicalLocation: { artifactLocation: { uri: pathToUri(f.file) }, region: region(f.related) },
        message: { text: f.related.message },
      }];
    }
    if (f.evidence) {
      r.properties = {
        x: f.evidence.x, expectedValue: f.evidence.expectedValue, foundValue: f.evidence.foundValue,
        maxError: f.evidence.maxError, tolerance: f.evidence.tolerance, points: f.evidence.points,
      };
    }
    if (f.fix) {
      r.fixes = [{
        description: { text: f.fix.title },
        artifactChanges: [{
          artifactLocation: { uri: pathToUri(f.file) },
          replacements: [{ deletedRegion: region(f.fix), insertedContent: { text: f.fix.text } }],
        }],
      }];
    }
    return r;
  });
  return {
    $schema: SARIF_SCHEMA,
    version: '2.1.0',
    runs: [{
      tool: {
        driver: {
          name: 'slopewise',
          version: opts.toolVersion,
          ...(opts.informationUri ? { informationUri: opts.informationUri } : {}),
          rules: RULES.map((id) => ({
            id,
            name: id.split('-').map((w) => w[0]!.toUpperCase() + w.slice(1)).join(''),
            shortDescription: { text: RULE_TEXT[id].short },
            fullDescription: { text: RULE_TEXT[id].full },
            defaultConfiguration: { level: RULE_TEXT[id].level },
          })),
        },
      },
      invocations: [{
        executionSuccessful: true,
        toolExecutionNotifications: problems.map((p) => ({
          level: 'error',
          message: { text: `${p.file}: ${p.message}` },
          locations: [{ physicalLocation: { artifactLocation: { uri: pathToUri(p.file) } } }],
        })),
      }],
      results,
    }],
  };
}
