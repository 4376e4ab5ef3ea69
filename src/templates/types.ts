// What a specimen template offers: named options with units and defaults, and a builder
// that writes a commented case file.

export interface TemplateOption {
  name: string;
  /** 'mm' for lengths, '' for words (material, softening, title). */
  unit: string;
  /** A number, a word, or 'auto' for a value derived from the other options. */
  default: number | string;
  min?: number;
  max?: number;
  choices?: string[];
  help: string;
}

export interface Template {
  name: string;
  summary: string;
  options: TemplateOption[];
  /** Commented YAML case text; options left out take their defaults; relations between options are checked here. */
  build(values: Record<string, number | string>): string;
}

/** Option values with every default filled in. */
export type Values = Record<string, number | string>;
