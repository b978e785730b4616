/**
 * Element coverage of common Gaussian basis-set families.
 *
 * Source: the element lists of the Basis Set Exchange metadata (Pritchard, Altarawy, Didier, Gibson &
 * Windus, J. Chem. Inf. Model. 59, 4814 (2019), doi:10.1021/acs.jcim.9b00725) AS REMEMBERED, not copied
 * from the database; the literature each range comes from is named beside it, also from memory. Ranges
 * marked `uncertain` are ones whose coverage we are not sure of (later additions, alternative
 * definitions): the UI should say "may not be covered" there rather than "not covered".
 * Elements are given by atomic number Z as inclusive ranges [from, to].
 */

export interface BasisFamilyCoverage {
  /** Canonical name, e.g. "6-31G*", "aug-cc-pVTZ", "def2-TZVP". */
  name: string;
  /** Other spellings accepted when looking the basis up. */
  aliases: string[];
  /** Inclusive Z ranges the basis defines. */
  covered: [number, number][];
  /** Inclusive Z ranges (subsets of `covered` or neighbours of it) whose coverage is uncertain. */
  uncertain: [number, number][];
  /** First Z at which the basis replaces core electrons by an effective core potential, or null. */
  ecpFromZ: number | null;
  note: string;
}

const POPLE_NOTE = "Pople split-valence family";

export const BASIS_FAMILIES: BasisFamilyCoverage[] = [
  {
    name: "STO-3G",
    aliases: [],
    covered: [[1, 54]],
    uncertain: [],
    ecpFromZ: null,
    note: "minimal basis; H–Ne Hehre, Stewart & Pople 1969, Na–Ar 1970, K–Xe Pietro et al. 1980s",
  },
  {
    name: "3-21G",
    aliases: [],
    covered: [[1, 55]],
    uncertain: [[55, 55]],
    ecpFromZ: null,
    note: `${POPLE_NOTE}; H–Ne Binkley, Pople & Hehre 1980, heavier elements Dobbs & Hehre`,
  },
  {
    name: "6-31G",
    aliases: [],
    covered: [[1, 36]],
    uncertain: [[31, 36]],
    ecpFromZ: null,
    note: `${POPLE_NOTE}; K–Zn Rassolov et al. 1998, Ga–Kr Rassolov et al. 2001`,
  },
  {
    name: "6-31G*",
    aliases: ["6-31G(d)"],
    covered: [[1, 36]],
    uncertain: [[31, 36]],
    ecpFromZ: null,
    note: `${POPLE_NOTE} with d polarization on heavy atoms`,
  },
  {
    name: "6-31+G*",
    aliases: ["6-31+G(d)"],
    covered: [[1, 36]],
    uncertain: [[19, 36]],
    ecpFromZ: null,
    note: `${POPLE_NOTE}; diffuse sp functions for Li–Ar from Clark et al. 1983`,
  },
  {
    name: "6-311G**",
    aliases: ["6-311G(d,p)"],
    covered: [
      [1, 36],
      [53, 53],
    ],
    uncertain: [
      [19, 36],
      [53, 53],
    ],
    ecpFromZ: null,
    note: "triple-split valence; H–Ne Krishnan et al. 1980, Na–Ar McLean & Chandler 1980, Ga–Kr Curtiss et al. 1995",
  },
  ...(["D", "T", "Q"] as const).flatMap((x) => [
    {
      name: `cc-pV${x}Z`,
      aliases: [],
      covered: [[1, 36]] as [number, number][],
      uncertain: [[19, 19]] as [number, number][],
      ecpFromZ: null,
      note: "correlation consistent; H–Ne Dunning 1989, Al–Ar Woon & Dunning 1993, Ga–Kr Wilson et al. 1999, Sc–Zn Balabanov & Peterson 2005",
    },
    {
      name: `aug-cc-pV${x}Z`,
      aliases: [],
      covered: [[1, 36]] as [number, number][],
      uncertain: [[19, 19]] as [number, number][],
      ecpFromZ: null,
      note: "correlation consistent with diffuse functions; Kendall, Dunning & Harrison 1992",
    },
  ]),
  {
    name: "cc-pV5Z",
    aliases: [],
    covered: [[1, 36]],
    uncertain: [
      [3, 4],
      [11, 12],
      [19, 20],
    ],
    ecpFromZ: null,
    note: "correlation consistent quintuple zeta",
  },
  {
    name: "aug-cc-pV5Z",
    aliases: [],
    covered: [[1, 36]],
    uncertain: [
      [3, 4],
      [11, 12],
      [19, 20],
    ],
    ecpFromZ: null,
    note: "correlation consistent quintuple zeta with diffuse functions",
  },
  ...["def2-SVP", "def2-TZVP", "def2-QZVP"].map((name) => ({
    name,
    aliases: [] as string[],
    covered: [[1, 86]] as [number, number][],
    uncertain: [[57, 71]] as [number, number][],
    ecpFromZ: 37,
    note: "Weigend & Ahlrichs 2005; Stuttgart–Köln effective core potentials from Rb (Z = 37) on",
  })),
];
