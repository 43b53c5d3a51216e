/**
 * The options `knotwise fit` has for surfaces of two inputs (listed in its one option table,
 * core/node/cli.ts), and the switch to the surface command when --x2 is given.
 */
import { InputError } from '../errors';
import { REACH_LIMITS, DEFAULT_REACH } from '../surface/coverage';
import { DEFAULT_SURFACE_GRID_COUNT } from '../surface/tableGrid';
import { parseCommand, type CommandSpec } from './args';
import { surfaceFitArgs, type SurfaceFitArgs } from './surfaceArgs';

/** The surface options, each placed in its group of `knotwise fit --help`. */
export const SURFACE_OPTIONS = {
  x2: {
    group: 'Data',
    name: 'x2',
    value: 'column',
    help: 'a second input column: fit a surface of --y over --x and --x2 (a tensor-product natural cubic regression spline) and write its 2-D table <name>.surface.csv and surface record <name>.surface.fit.json',
    defaultText: 'one input: a curve',
  },
  grid2: {
    group: 'Table',
    name: 'grid2',
    value: 'grid',
    help: 'with --x2: the nodes along the second input, in the forms of --grid (which gives those along --x); auto:<tolerance> chooses the coarsest even steps at which bilinear interpolation between nodes stays within the tolerance (units of y)',
    defaultText: `${DEFAULT_SURFACE_GRID_COUNT} nodes over each input's data range`,
  },
  reach: {
    group: 'Table',
    name: 'reach',
    value: 'share',
    help: "with --x2: a table node farther than this from every reading, in shares of each input's data range, is flagged as beyond the readings' reach (as is a node outside their convex hull)",
    default: String(DEFAULT_REACH),
    limits: `${REACH_LIMITS.min} to ${REACH_LIMITS.max}`,
  },
} as const;

/** The surface run the arguments ask for, or undefined without --x2 (a curve) or with --help (the curve command prints it). */
export function surfaceArgsOf<N extends string>(spec: CommandSpec<N>, argv: readonly string[]): SurfaceFitArgs | undefined {
  const a = parseCommand(spec, argv);
  if (a.help) return undefined;
  if (!a.given('x2' as N)) {
    const stray = (['grid2', 'reach'] as const).find((n) => a.given(n as N));
    if (stray !== undefined) throw new InputError(`--${stray} is for surfaces of two inputs: give the second input with --x2, or drop --${stray}`);
    return undefined;
  }
  return surfaceFitArgs({
    operands: a.operands,
    given: (n) => a.given(n as N),
    text: (n) => a.text(n as N),
    flag: (n) => a.flag(n as N),
  });
}
