// Material presets of the templates, each with the honest origin of its numbers.

export interface MaterialPreset {
  name: string;
  /** One line for option help. */
  summary: string;
  E: number; nu: number; ft: number; GF: number;
  /** Fracture toughness K_Ic (MPa√m), for crack.model lefm; its origin is in `source`. */
  KIc?: number;
  /** Comment lines written above the material block. */
  source: string[];
}

export const MATERIALS: MaterialPreset[] = [
  {
    name: 'concrete-normal',
    summary: 'normal-strength concrete',
    E: 32000, nu: 0.2, ft: 3.0, GF: 0.1,
    source: [
      'Typical values of normal-strength concrete (E 25-40 GPa, ft 2-4 MPa,',
      'GF 0.05-0.15 N/mm), common practice.',
    ],
  },
  {
    name: 'concrete-high-strength',
    summary: 'high-strength concrete C70/85',
    E: 42600, nu: 0.2, ft: 4.61, GF: 0.16,
    source: [
      'fib Model Code 2010 formulas for a C70/85 concrete, f_cm = 70 + 8 = 78 MPa',
      '(the 8 MPa margin from memory): E_ci = 21.5 GPa (78/10)^(1/3) = 42.6 GPa;',
      'f_ctm = 2.12 ln(1 + 78/10) = 4.61 MPa (the formula for f_ck above 50 MPa,',
      'from memory); GF = 73 x 78^0.18 N/m = 160 N/m = 0.16 N/mm; nu 0.2, common practice.',
    ],
  },
  {
    name: 'mortar',
    summary: 'cement mortar',
    E: 25000, nu: 0.2, ft: 3.5, GF: 0.05,
    source: ['Typical values of a cement mortar, from memory.'],
  },
  {
    name: 'granite',
    summary: 'granite',
    E: 50000, nu: 0.25, ft: 8, GF: 0.15,
    source: ['Typical values of a fine-grained granite, from memory.'],
  },
  {
    name: 'ceramic-alumina',
    summary: 'dense alumina ceramic',
    E: 370000, nu: 0.22, ft: 300, GF: 0.0432, KIc: 4,
    source: [
      'Dense alumina, from memory: E 300-400 GPa, nu about 0.22, flexural strength',
      '300-400 MPa (ft taken at the low end, as the tensile strength lies below the',
      'flexural strength), K_Ic 3-5 MPa m^0.5 (4 taken); GF = K_Ic^2 / E with E\' = E',
      'in plane stress: 4^2 x 1000 / 370000 = 0.0432 N/mm.',
    ],
  },
];

export const MATERIAL_NAMES = MATERIALS.map((m) => m.name);

export function materialNamed(name: string): MaterialPreset {
  const m = MATERIALS.find((p) => p.name === name);
  if (!m) throw new Error(`no material preset ${name}`);
  return m;
}

/** Hillerborg's characteristic length E·GF/ft² in mm. */
export const charLength = (m: { E: number; ft: number; GF: number }): number => (m.E * m.GF) / (m.ft * m.ft);
