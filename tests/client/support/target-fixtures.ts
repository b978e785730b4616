import type { TargetDetail, TargetSummary } from "@shared/schemas";
import { KESTREL_ID } from "./fixtures";

export const TARGET_IDS = {
  water: "7a260000-0000-4000-8000-000000000001",
  heavyWater: "7a260000-0000-4000-8000-000000000002",
  nf3: "7a260000-0000-4000-8000-000000000003",
};

const CREATED = "2026-11-20T09:00:00.000Z";

function summary(overrides: Partial<TargetSummary> & Pick<TargetSummary, "id" | "name">): TargetSummary {
  return {
    groupId: KESTREL_ID,
    parentTargetId: null,
    latestVersion: 1,
    formula: "H2O",
    pointGroup: "C2v",
    abelianSubgroup: "C2v",
    runCount: 0,
    createdAt: CREATED,
    updatedAt: CREATED,
    ...overrides,
  };
}

export const water = summary({ id: TARGET_IDS.water, name: "Water", latestVersion: 2, runCount: 3 });
export const heavyWater = summary({
  id: TARGET_IDS.heavyWater,
  name: "Heavy water",
  parentTargetId: TARGET_IDS.water,
  formula: "D2O",
});
export const nf3 = summary({
  id: TARGET_IDS.nf3,
  name: "Nitrogen trifluoride",
  formula: "F3N",
  pointGroup: "C3v",
  abelianSubgroup: "Cs",
});

/** The group's target list as the API nests it: isotopologues under their parent only. */
export function targetList() {
  return {
    targets: [
      { ...water, isotopologues: [heavyWater] },
      { ...nf3, isotopologues: [] },
    ],
  };
}

/*
 * Water, version 2, as the API would describe it. The geometry is r(OH) = 0.9578 Å, θ = 104.48° (the demo
 * target's, deploy/demo/targets.ts); the derived numbers are approximate, from memory (rotational constants
 * near the experimental 27.9, 14.5, 9.3 cm⁻¹), since these tests check that the page shows what the API
 * gives, not the science core.
 */
export function waterDetail(): TargetDetail {
  const atoms = [
    { symbol: "O", massNumber: null, xAngstrom: 0, yAngstrom: 0, zAngstrom: 0, partialChargeE: null },
    {
      symbol: "H",
      massNumber: null,
      xAngstrom: 0.7572201193,
      yAngstrom: 0,
      zAngstrom: 0.5865138796,
      partialChargeE: null,
    },
    {
      symbol: "H",
      massNumber: null,
      xAngstrom: -0.7572201193,
      yAngstrom: 0,
      zAngstrom: 0.5865138796,
      partialChargeE: null,
    },
  ];
  const versionId = "7a260000-0000-4000-8000-0000000000f2";
  return {
    ...water,
    current: {
      id: versionId,
      targetId: TARGET_IDS.water,
      version: 2,
      atoms,
      charge: 0,
      multiplicity: 1,
      notes: "Experimental equilibrium geometry.",
      createdAt: "2026-11-21T09:00:00.000Z",
      createdByName: "Tomás Brandt",
      derived: {
        atomCount: 3,
        formula: "H2O",
        totalMassU: 18.0106,
        chargeE: 0,
        electronCount: 10,
        multiplicity: 1,
        centreOfMassAngstrom: [0, 0, 0.0656],
        principalMomentsUAngstrom2: [0.6144, 1.1556, 1.77],
        rotationalConstantsCm1: [27.44, 14.59, 9.525],
        rotationalConstantsMHz: [822_600, 437_400, 285_600],
        rotorType: "asymmetric",
        rayAsymmetry: -0.4,
        nuclearRepulsionHartree: 9.1882,
        pointGroup: "C2v",
        groupOrder: 4,
        abelianSubgroup: "C2v",
        irreps: ["A1", "A2", "B1", "B2"],
        characterTable: [],
        abelianOperations: ["E", "C2", "σv(xz)", "σv(yz)"],
        equivalentAtomSets: [[1], [2, 3]],
        abelianEquivalentAtomSets: [[1], [2, 3]],
        operations: [],
        orientationMatrix: [
          [1, 0, 0],
          [0, 1, 0],
          [0, 0, 1],
        ],
        toleranceAngstrom: 0.01,
        maxSymmetrizationShiftAngstrom: 0,
        atoms: [
          {
            index: 1,
            symbol: "O",
            atomicNumber: 8,
            massNumber: 16,
            massU: 15.9949,
            positionAngstrom: [0, 0, -0.0656],
          },
          {
            index: 2,
            symbol: "H",
            atomicNumber: 1,
            massNumber: 1,
            massU: 1.00783,
            positionAngstrom: [0.7572, 0, 0.5209],
          },
          {
            index: 3,
            symbol: "H",
            atomicNumber: 1,
            massNumber: 1,
            massU: 1.00783,
            positionAngstrom: [-0.7572, 0, 0.5209],
          },
        ],
        dipole: null,
      },
    },
    versions: [
      { id: versionId, version: 2, createdAt: "2026-11-21T09:00:00.000Z", createdByName: "Tomás Brandt" },
      {
        id: "7a260000-0000-4000-8000-0000000000f1",
        version: 1,
        createdAt: CREATED,
        createdByName: "Noor Vasquez",
      },
    ],
    isotopologues: [heavyWater],
  };
}
