// The coarse demo beam as case data, for study tests.
import { parse } from 'yaml';
import { coarseDemoYaml } from './support/cli.js';

export function coarseCase(change: (c: Record<string, any>) => void = () => {}): Record<string, unknown> {
  return parse(coarseDemoYaml((c) => { c.control.increments = 15; c.output.pngWidth = 400; change(c); })) as Record<string, unknown>;
}
