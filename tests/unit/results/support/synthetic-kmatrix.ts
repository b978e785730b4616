/**
 * A large but valid K-matrix table in the `kmatrices.txt` format, for tests and benchmarks of the
 * derivation's cost (not of its physics): smooth made-up symmetric K-matrices on a common energy grid.
 */

export interface SyntheticKMatrixSize {
  energies: number;
  irreps: number;
  channels: number;
}

/** The first `count` (l, m) pairs: l = 0, 1, …, m = −l..l. */
function channelList(count: number): [number, number][] {
  const list: [number, number][] = [];
  for (let l = 0; list.length < count; l++) {
    for (let m = -l; m <= l && list.length < count; m++) list.push([l, m]);
  }
  return list;
}

/** The file's text; about `energies × irreps × channels² × 10` bytes. */
export function syntheticKMatrixText(size: SyntheticKMatrixSize): string {
  const n = size.channels;
  const channels = channelList(n);
  const parts = [
    "format sigmaflow-kmatrix 1",
    "model synthetic smooth K-matrices (teaching-grade model)",
    "target_spin_multiplicity 1",
  ];
  const row = new Array<string>(n * n);
  for (let s = 0; s < size.irreps; s++) {
    parts.push(`irrep G${s + 1} total_spin_multiplicity 2 channels ${n}`);
    channels.forEach(([l, m], i) => {
      parts.push(`channel ${i + 1} ${l} ${m}`);
    });
    for (let e = 0; e < size.energies; e++) {
      const energyEv = 0.05 + (20 * e) / Math.max(1, size.energies - 1);
      for (let r = 0; r < n; r++) {
        for (let c = r; c < n; c++) {
          const value =
            r === c
              ? Math.tan((0.4 * Math.sin(0.1 * energyEv + 0.3 * r + s)) / (1 + channels[r]![0]))
              : (0.05 * Math.cos(0.2 * energyEv + 0.7 * (r + c) + s)) / (1 + Math.abs(r - c));
          const text = value.toPrecision(6);
          row[r * n + c] = text;
          row[c * n + r] = text;
        }
      }
      parts.push(`energy ${energyEv.toPrecision(10)} ${row.join(" ")}`);
    }
    parts.push("end irrep");
  }
  return `${parts.join("\n")}\n`;
}
