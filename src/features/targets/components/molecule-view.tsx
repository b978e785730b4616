import type { TargetInspection } from "@shared/science/geometry";
import { useEffect, useRef, useState } from "react";
import { formulaText } from "@/lib/formula";

/** True when the browser can give a WebGL context (headless browsers and jsdom often cannot). */
function webglAvailable(): boolean {
  try {
    const canvas = document.createElement("canvas");
    return Boolean(canvas.getContext("webgl2") ?? canvas.getContext("webgl"));
  } catch {
    return false;
  }
}

type Viewer = ReturnType<typeof import("3dmol")["createViewer"]>;
type View = { state: "loading" } | { state: "ready" } | { state: "unavailable"; message: string };

const AXIS_COLOURS = ["#b91c1c", "#15803d", "#1d4ed8"];

function draw(viewer: Viewer, inspection: TargetInspection) {
  viewer.removeAllModels();
  viewer.removeAllShapes();
  viewer.removeAllLabels();
  const xyz = [
    String(inspection.atoms.length),
    inspection.formula,
    ...inspection.atoms.map((atom) => `${atom.symbol} ${atom.positionAngstrom.join(" ")}`),
  ].join("\n");
  viewer.addModel(xyz, "xyz");
  viewer.setStyle({}, { stick: { radius: 0.12 }, sphere: { scale: 0.25 } });
  const extent = Math.max(1, ...inspection.atoms.map((atom) => Math.hypot(...atom.positionAngstrom))) + 0.8;
  ["x", "y", "z"].forEach((name, i) => {
    const end = { x: 0, y: 0, z: 0, [name]: extent };
    viewer.addArrow({ start: { x: 0, y: 0, z: 0 }, end, radius: 0.03, color: AXIS_COLOURS[i] });
    viewer.addLabel(name, { position: end, fontSize: 11, fontColor: AXIS_COLOURS[i], backgroundOpacity: 0 });
  });
  for (const op of inspection.operations) {
    if (op.kind !== "C" || op.n < 2 || op.k !== 1 || !op.axis) continue;
    const [ax, ay, az] = op.axis.map((c) => c * extent) as [number, number, number];
    viewer.addCylinder({
      start: { x: -ax, y: -ay, z: -az },
      end: { x: ax, y: ay, z: az },
      radius: 0.02,
      color: "#7c3aed",
      dashed: true,
    });
  }
  // The container may have been laid out after the viewer measured it.
  viewer.resize();
  viewer.zoomTo();
  // zoomTo frames the atoms only (minimumZoomToDistance below); step back so the axis arrows fit too.
  viewer.zoom(0.7);
  viewer.render();
}

/**
 * The molecule in its standard orientation (centre of mass at the origin, Å) with the standard axes x, y, z
 * drawn as arrows and each proper rotation axis Cₙ (n ≥ 2) the science core found as a dashed line.
 * 3Dmol.js is loaded on demand in its own chunk, once; later changes redraw the same viewer. Without WebGL
 * the view says so in words.
 */
export function MoleculeView({ inspection }: { inspection: TargetInspection }) {
  const container = useRef<HTMLDivElement>(null);
  const viewer = useRef<Viewer | null>(null);
  const latest = useRef(inspection);
  latest.current = inspection;
  const [view, setView] = useState<View>({ state: "loading" });

  useEffect(() => {
    if (!webglAvailable()) {
      setView({
        state: "unavailable",
        message:
          "This browser offers no WebGL, so the 3D view is off; the atoms and derived values above are complete.",
      });
      return;
    }
    let cancelled = false;
    import("3dmol")
      .then((mol) => {
        if (cancelled || !container.current) return;
        viewer.current = mol.createViewer(container.current, {
          backgroundColor: "white",
          // 3Dmol frames at least 5 Å by default, which leaves a small molecule a speck.
          minimumZoomToDistance: 1,
        });
        draw(viewer.current, latest.current);
        setView({ state: "ready" });
      })
      .catch(() => {
        if (!cancelled) {
          setView({
            state: "unavailable",
            message: "The 3D viewer could not be loaded; reload to try again.",
          });
        }
      });
    return () => {
      cancelled = true;
      viewer.current?.clear();
      viewer.current = null;
    };
  }, []);

  useEffect(() => {
    if (viewer.current) draw(viewer.current, inspection);
  }, [inspection]);

  return (
    <figure className="flex flex-col gap-1">
      {view.state === "unavailable" ? (
        <p
          role="status"
          className="rounded-lg border border-ink-100 bg-ink-50 px-4 py-3 text-sm text-ink-700"
        >
          {view.message}
        </p>
      ) : (
        <div
          ref={container}
          aria-label={`3D view of ${formulaText(inspection.formula)}`}
          role="img"
          className="relative h-72 w-full overflow-hidden rounded-lg border border-ink-100"
        />
      )}
      <figcaption className="text-xs text-ink-600">
        Standard orientation, centre of mass at the origin (Å): axes x (red), y (green), z (blue); dashed
        violet lines are the rotation axes Cₙ of {inspection.pointGroup}.
      </figcaption>
    </figure>
  );
}
