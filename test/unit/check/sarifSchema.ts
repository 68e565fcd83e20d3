// The published SARIF 2.1.0 JSON schema (copy shipped in the npm package @microsoft/jest-sarif,
// lib/schemas/sarif-2.1.0-rtm.5.json, JSON Schema draft-04), compiled with ajv; the `uri`,
// `uri-reference` and `date-time` formats it uses are checked with the WHATWG URL parser and Date.
import * as fs from 'node:fs';
import * as path from 'node:path';
import Ajv from 'ajv-draft-04';

export const SARIF_SCHEMA_FILE = path.resolve(__dirname, '..', '..', '..', 'node_modules', '@microsoft', 'jest-sarif', 'lib', 'schemas', 'sarif-2.1.0-rtm.5.json');

export function sarifValidator(): ReturnType<Ajv['compile']> {
  // unicodeRegExp off: the schema's language pattern has a stray ']' that only non-unicode regexps accept
  const ajv = new Ajv({ allErrors: true, strict: false, unicodeRegExp: false });
  ajv.addFormat('uri', (s: string) => { try { new URL(s); return true; } catch { return false; } });
  ajv.addFormat('uri-reference', (s: string) => { try { new URL(s, 'file:///base/'); return !/\s/.test(s); } catch { return false; } });
  ajv.addFormat('date-time', (s: string) => /^\d{4}-\d{2}-\d{2}T/.test(s) && !Number.isNaN(Date.parse(s)));
  return ajv.compile(JSON.parse(fs.readFileSync(SARIF_SCHEMA_FILE, 'utf8')));
}
