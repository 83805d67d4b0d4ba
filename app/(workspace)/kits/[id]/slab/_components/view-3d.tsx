"use client";

import { Canvas, useThree } from "@react-three/fiber";
import { useEffect, useMemo } from "react";
import { BufferAttribute, BufferGeometry, PerspectiveCamera } from "three";
import { OrbitControls } from "three/examples/jsm/controls/OrbitControls.js";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import type { Body, DisplayPart } from "./protocol";

/**
 * The camera round the slab. The top view fits the whole slab in the canvas, whichever of its sides
 * is the tighter fit (a tall slab in a wide canvas fits by its depth), with a little room round it.
 */
function Controls({ top, center }: { top: boolean; center: [number, number, number] }) {
  const { camera, gl, invalidate, size } = useThree();
  useEffect(() => {
    const c = new OrbitControls(camera, gl.domElement);
    // Frames are drawn on demand (after a change or while the view is moved), not 60 times a second.
    c.addEventListener("change", () => invalidate());
    c.target.set(...center);
    const d = Math.max(center[0], center[1]) * 2.6 + 40;
    if (top && camera instanceof PerspectiveCamera) {
      const aspect = size.width / Math.max(1, size.height);
      const halfV = Math.tan(((camera.fov / 2) * Math.PI) / 180);
      // Distance at which half the slab's depth fills half the view's height, and the same for its width.
      const need = Math.max(center[1] / halfV, center[0] / (halfV * aspect)) * 1.08 + 2;
      camera.position.set(center[0], center[1], need);
    } else if (top) camera.position.set(center[0], center[1], d);
    else camera.position.set(center[0] + d * 0.45, center[1] - d * 0.75, d * 0.6);
    camera.up.set(0, 0, 1);
    c.update();
    invalidate();
    return () => c.dispose();
  }, [camera, gl, top, center, invalidate, size.width, size.height]);
  return null;
}

function useGeometry(positions: Float32Array, indices: Uint32Array, normals: boolean) {
  const geometry = useMemo(() => {
    const g = new BufferGeometry();
    g.setAttribute("position", new BufferAttribute(positions, 3));
    g.setIndex(new BufferAttribute(indices, 1));
    if (normals) g.computeVertexNormals();
    g.computeBoundingSphere();
    return g;
  }, [positions, indices, normals]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  return geometry;
}

function SlabMesh({ slab, onPick }: { slab: Body; onPick: (slot?: number) => void }) {
  // Flat shading takes its normals from the screen-space derivatives: the slab needs none of its own.
  const geometry = useGeometry(slab.positions, slab.indices, false);
  return (
    <mesh geometry={geometry} onClick={(e) => (e.stopPropagation(), onPick(undefined))}>
      <meshLambertMaterial color="#efe8dc" flatShading />
    </mesh>
  );
}

function PartGeometry({ part, children }: { part: DisplayPart; children: (g: BufferGeometry) => React.ReactNode }) {
  const geometry = useGeometry(part.positions, part.indices, true);
  return <>{children(geometry)}</>;
}

/**
 * The slab and its pieces in 3D: orbit, pan and zoom; a top view; click a piece to select it. Each
 * part's geometry is made once; an edit moves the pieces and swaps the slab's geometry only. Pieces
 * are selected by kit slot (the number changes when pieces move; the slot stays with the piece).
 */
export function View3D({
  slab,
  parts,
  pieces,
  size,
  top,
  selected,
  flagged,
  onPick,
}: {
  slab: Body | null;
  parts: DisplayPart[];
  pieces: PlacedPiece[];
  size: { width: number; depth: number };
  top: boolean;
  selected?: number;
  flagged: Set<number>;
  onPick: (slot?: number) => void;
}) {
  const center = useMemo<[number, number, number]>(() => [size.width / 2, size.depth / 2, 0], [size.width, size.depth]);
  return (
    <Canvas
      frameloop="demand"
      dpr={[1, 1.5]}
      gl={{ antialias: false, powerPreference: "high-performance" }}
      camera={{ fov: 35, near: 1, far: 5000 }}
      data-testid="view-3d"
      onPointerMissed={() => onPick(undefined)}
    >
      <ambientLight intensity={0.55} />
      <directionalLight position={[size.width, -size.depth, 300]} intensity={1.6} />
      <directionalLight position={[-100, 200, 150]} intensity={0.4} />
      <Controls top={top} center={center} />
      {slab ? <SlabMesh slab={slab} onPick={onPick} /> : null}
      {parts.map((part) => (
        <PartGeometry key={part.id} part={part}>
          {(g) =>
            pieces
              .filter((p) => p.partId === part.id)
              .map((p) => (
                <mesh
                  key={p.slot}
                  geometry={g}
                  position={[p.x, p.y, p.z]}
                  rotation={[0, 0, (p.rotation * Math.PI) / 180]}
                  onClick={(e) => (e.stopPropagation(), onPick(p.slot))}
                >
                  <meshLambertMaterial color={p.slot === selected ? "#6d4aff" : flagged.has(p.slot) ? "#b7791f" : "#4a4f57"} />
                </mesh>
              ))
          }
        </PartGeometry>
      ))}
    </Canvas>
  );
}
