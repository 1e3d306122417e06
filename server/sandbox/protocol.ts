/**
 * The narrow channel between the script API inside QuickJS (prelude.ts) and the host side in the worker
 * (bridge.ts). Only numbers, strings and ArrayBuffers cross it; a numeric array crosses as one
 * ArrayBuffer (one copy per call, never one host call per number).
 *
 * Structured values (dataset tables, kernel reports, output specs) cross as a JSON string in which each
 * Float64Array is replaced by a placeholder `{"$f64": i}`; buffer i travels beside it.
 */
import type * as Api from '../../shared/script-api';

/** An argument of a kernel method call: a number, an ArrayBuffer holding a Float64Array, or a JSON string (options). */
export type HostArg = number | string | ArrayBuffer;

/**
 * What a host call returns: a number, null, an ArrayBuffer (to be viewed as a Float64Array), or a JSON
 * string with `{"$f64": i}` placeholders whose buffers are fetched with `buffer(i)`.
 */
export type HostReturn = number | null | ArrayBuffer | string;

export const F64_PLACEHOLDER = '$f64';

/**
 * How each argument of a universe method crosses: 'n' a number or numeric array (one ArrayBuffer),
 * 'o' an options object (JSON), 'j' any plain value (JSON: a number, a formula string, a table).
 */
export type ArgKind = 'n' | 'o' | 'j';
export interface MethodSpec {
  /** Argument names (for messages) and kinds; the first 'n' or 'j' argument is required. */
  readonly args: readonly (readonly [name: string, kind: ArgKind])[];
}

const Z: MethodSpec = { args: [['z', 'n']] };
const D: MethodSpec = { args: [['d', 'n']] };
const T: MethodSpec = { args: [['t', 'n']] };
const NONE: MethodSpec = { args: [] };
const OPTS: MethodSpec = { args: [['options', 'o']] };

/**
 * Every method of a script's universe object and how its arguments cross. Typed against the script
 * API so that the table, the declaration the editor shows and the prelude cannot drift apart.
 */
export const UNIVERSE_METHODS: Record<Exclude<keyof Api.Universe, 'params'>, MethodSpec> = {
  E: Z, H: Z, omegaMatter: Z, omegaPhotons: Z, omegaNeutrinos: Z, omegaDarkEnergy: Z, omegaCurvature: Z,
  Tcmb: Z, Tnu: Z, decelerationParameter: Z, comovingDistance: Z, transverseComovingDistance: Z,
  angularDiameterDistance: Z, luminosityDistance: Z, distanceModulus: Z,
  angularDiameterDistanceBetween: { args: [['z1', 'n'], ['z2', 'n']] },
  lookbackTime: Z, age: Z, conformalTime: Z, particleHorizon: Z, comovingVolume: Z, differentialComovingVolume: Z,
  properSizePerArcsec: Z, comovingSizePerArcsec: Z,
  redshiftAtComovingDistance: D, redshiftAtLuminosityDistance: D, redshiftAtAge: T, redshiftAtLookbackTime: T,
  growthFactor: { args: [['z', 'n'], ['options', 'o']] }, growthRate: Z, decayingMode: Z,
  fSigma8: { args: [['z', 'n'], ['sigma8', 'n']] },
  toMpcPerH: D, fromMpcPerH: D,
  scaleFactorAtTime: T, hubbleAtTime: T,
  accelerationOnsetRedshift: NONE, energyConditions: OPTS, history: OPTS, pastLimit: NONE,
  raychaudhuriResidual: NONE, singularityStatement: NONE, equalityRedshift: NONE,
  skyIntensity: { args: [['j', 'j'], ['options', 'o']] }, warnings: OPTS, toJSON: NONE,
};

export interface HostBridge {
  /** Build a kernel model from JSON parameters; returns its handle id. */
  universe(paramsJson: string): number;
  /** The model's parameters as JSON (placeholders allowed). */
  universeParams(id: number): string;
  /** Call a kernel method of model `id`. */
  call(id: number, method: string, ...args: HostArg[]): HostReturn;
  /** χ² of model `id` against the dataset of that name. */
  chi2(id: number, datasetName: string, optionsJson: string): HostReturn;
  /** The dataset of that name as JSON with placeholders. */
  dataset(name: string): string;
  /** Buffer i of the last JSON answer. */
  buffer(i: number): ArrayBuffer;
  linspace(start: number, stop: number, n: number): ArrayBuffer;
  logspace(startExp: number, stopExp: number, n: number): ArrayBuffer;
  convert(value: number, from: string, to: string): number;
  /** Declare a recipe input; returns the run's value or the default. */
  param(name: string, optionsJson: string): number;
  /** Run a recipe in a nested context; returns JSON {name: value}. */
  recipe(name: string, inputsJson: string): string;
  /** Record an output; `json` has placeholders for the buffers that follow. */
  show(kind: 'value' | 'table' | 'plot', json: string, ...buffers: ArrayBuffer[]): void;
  print(text: string): void;
  /** Stop the run with this message (a bad argument found inside QuickJS). Always throws. */
  fail(message: string): never;
  /** Tell the host where in the user's source the stopping error was raised (a QuickJS stack). */
  locate(stack: string): void;
  /** Whether the run has already been stopped by a bridge error or limit. */
  stopped(): boolean;
  /** The run's seed (unsigned 32-bit). */
  seed(): number;
  /** The fixed clock of the run, ms since 1970. */
  clock(): number;
}

/** Every HostBridge function by name (a Record, so the compiler insists on all of them). */
const HOST_FUNCTION_SET: Record<keyof HostBridge, true> = {
  universe: true, universeParams: true, call: true, chi2: true, dataset: true, buffer: true, linspace: true,
  logspace: true, convert: true, param: true, recipe: true, show: true, print: true, fail: true, locate: true,
  stopped: true, seed: true, clock: true,
};
export const HOST_FUNCTIONS = Object.keys(HOST_FUNCTION_SET) as (keyof HostBridge)[];

/** File name the user's script is evaluated under; stack frames with it are the user's lines. */
export const SCRIPT_FILENAME = 'script';
export const PRELUDE_FILENAME = 'comoving-api';
