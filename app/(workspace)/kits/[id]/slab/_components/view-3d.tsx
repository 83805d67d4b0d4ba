"use client";

import { Canvas, useThree } from "@react-three/fiber";
import { useEffect, useMemo } from "react";
import { BufferAttribute, BufferGeometry } from "three";
import { OrbitControls } from "three/examples/jsm/controls/OrbitControls.js";
import type { Body } from "./protocol";

function Controls({ top, center }: { top: boolean; center: [number, number, number] }) {
  const { camera, gl, invalidate } = useThree();
  useEffect(() => {
    const c = new OrbitControls(camera, gl.domElement);
    // Frames are drawn on demand (after a change or while the view is moved), not 60 times a second.
    c.addEventListener("change", () => invalidate());
    c.target.set(...center);
    const d = Math.max(center[0], center[1]) * 2.6 + 40;
    if (top) camera.position.set(center[0], center[1], d);
    else camera.position.set(center[0] + d * 0.45, center[1] - d * 0.75, d * 0.6);
    camera.up.set(0, 0, 1);
    c.update();
    invalidate();
    return () => c.dispose();
  }, [camera, gl, top, center, invalidate]);
  return null;
}

function BodyMesh({ body, selected, flagged, onPick }: { body: Body; selected: boolean; flagged: boolean; onPick: (n?: number) => void }) {
  const geometry = useMemo(() => {
    const g = new BufferGeometry();
    g.setAttribute("position", new BufferAttribute(body.positions, 3));
    g.setIndex(new BufferAttribute(body.indices, 1));
    g.computeVertexNormals();
    return g;
  }, [body]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  const colour = body.piece === undefined ? "#efe8dc" : selected ? "#6d4aff" : flagged ? "#b7791f" : "#4a4f57";
  return (
    <mesh geometry={geometry} onClick={(e) => (e.stopPropagation(), onPick(body.piece))}>
      <meshStandardMaterial color={colour} flatShading={body.piece === undefined} />
    </mesh>
  );
}

/** The slab and its pieces in 3D: orbit, pan and zoom; a top view; click a piece to select it. */
export function View3D({ bodies, size, top, selected, flagged, onPick }: { bodies: Body[]; size: { width: number; depth: number }; top: boolean; selected?: number; flagged: Set<number>; onPick: (n?: number) => void }) {
  const center = useMemo<[number, number, number]>(() => [size.width / 2, size.depth / 2, 0], [size.width, size.depth]);
  return (
    <Canvas frameloop="demand" camera={{ fov: 35, near: 1, far: 5000 }} data-testid="view-3d" onPointerMissed={() => onPick(undefined)}>
      <ambientLight intensity={0.55} />
      <directionalLight position={[size.width, -size.depth, 300]} intensity={1.6} />
      <directionalLight position={[-100, 200, 150]} intensity={0.4} />
      <Controls top={top} center={center} />
      {bodies.map((b, i) => (
        <BodyMesh key={`${b.name}-${i}`} body={b} selected={b.piece !== undefined && b.piece === selected} flagged={b.piece !== undefined && flagged.has(b.piece)} onPick={onPick} />
      ))}
    </Canvas>
  );
}
