/**
 * Code emitters by kind: which files `--emit c,ts,json` writes, under which names.
 */
import { InputError } from '../errors';
import { cHeader } from './cHeader';
import { EMIT_KINDS, type EmitInput, type EmitKind, type EmitPart } from './common';
import { jsonTable } from './jsonTable';
import { tsModule } from './tsModule';

export { EMIT_KINDS, type EmitInput, type EmitKind, type EmitPart } from './common';

/**
 * Parses an emitter list such as `c,ts,json` (any order, repeats ignored) into EMIT_KINDS
 * order. Throws InputError naming an unknown kind. Example: parseEmit('json,c') -> ['c', 'json'].
 */
export function parseEmit(text: string): EmitKind[] {
  const asked = text.split(',').map((s) => s.trim().toLowerCase());
  for (const a of asked) {
    if (!EMIT_KINDS.some((k) => k === a)) throw new InputError(`unknown emitter "${a}" in "${text}"; use c, ts or json (comma-separated)`);
  }
  return EMIT_KINDS.filter((k) => asked.includes(k));
}

/**
 * File name of an emitted file: `<stem>.curve.h`, `<stem>.curve.ts`, `<stem>.curve.json`, and
 * for the inverse table `<stem>.inverse.h`, `.inverse.ts`, `.inverse.json`.
 */
export function emitName(kind: EmitKind, stem: string, part: EmitPart = 'curve'): string {
  return `${stem}.${part}.${kind === 'c' ? 'h' : kind}`;
}

/** The text of one emitted file. */
export function emitText(kind: EmitKind, input: EmitInput): string {
  switch (kind) {
    case 'c':
      return cHeader(input);
    case 'ts':
      return tsModule(input);
    case 'json':
      return jsonTable(input);
  }
}
