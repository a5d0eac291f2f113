import { useEffect, useMemo } from 'react';
import { Canvas, useThree } from '@react-three/fiber';
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { ObjectShape, Vec3Tuple } from '../../lib/sheet/types';
import { PALETTE, SCENE_COLOURS } from '../../lib/view/palette';
import type { SceneModel, ViewRoller } from '../../lib/view/scene-model';

const Z_UP = new THREE.Vector3(0, 0, 1);
/** Where the camera starts, seen from the object: in front, to the right and above. */
const VIEW_DIRECTION = new THREE.Vector3(0.9, -1.6, 0.9).normalize();

const vector = (v: Vec3Tuple) => new THREE.Vector3(v[0], v[1], v[2]);

/** Geometry of the object in its own frame; three's cylinders and capsules run along y, ours along z. */
function objectGeometry(shape: ObjectShape): THREE.BufferGeometry {
  switch (shape.kind) {
    case 'sphere':
      return new THREE.SphereGeometry(shape.radius, 48, 32);
    case 'box':
      return new THREE.BoxGeometry(2 * shape.halfExtents[0], 2 * shape.halfExtents[1], 2 * shape.halfExtents[2]);
    case 'cylinder':
      return new THREE.CylinderGeometry(shape.radius, shape.radius, 2 * shape.halfLength, 48).rotateX(Math.PI / 2);
    case 'capsule':
      return new THREE.CapsuleGeometry(shape.radius, 2 * shape.halfLength, 12, 32).rotateX(Math.PI / 2);
    case 'ellipsoid':
      return new THREE.SphereGeometry(1, 48, 32).scale(shape.semiAxes[0], shape.semiAxes[1], shape.semiAxes[2]);
  }
}

/**
 * Materials and unit geometries shared by every drawing of the scene: an edit only moves and scales
 * objects, so three.js never compiles a shader program again (a fresh material whose predecessor
 * was disposed made it compile and link anew on every keystroke, the largest cost of an edit).
 */
const SHARED = {
  sphere: new THREE.SphereGeometry(1, 32, 20),
  /** Axis along y, height 1, radius 1. */
  cylinder: new THREE.CylinderGeometry(1, 1, 1, 40),
  contact: new THREE.SphereGeometry(1, 16, 12),
  shaft: new THREE.CylinderGeometry(1, 1, 1, 10),
  cone: new THREE.ConeGeometry(1, 1, 16),
  chain: new THREE.LineBasicMaterial({ color: SCENE_COLOURS.chain }),
  plain: new Map<string, THREE.MeshBasicMaterial>(),
};

/** The one unlit material of a colour (arrows, contact points). */
function plainMaterial(colour: string): THREE.MeshBasicMaterial {
  let material = SHARED.plain.get(colour);
  if (!material) SHARED.plain.set(colour, (material = new THREE.MeshBasicMaterial({ color: colour })));
  return material;
}

function SceneObject({ model }: { model: SceneModel['object'] }) {
  // Each model carries a fresh copy of the shape: keyed by its numbers, an edit elsewhere keeps the geometry and its edges.
  const shapeKey = JSON.stringify(model.shape);
  const geometry = useMemo(() => objectGeometry(JSON.parse(shapeKey) as ObjectShape), [shapeKey]);
  const edges = useMemo(() => new THREE.EdgesGeometry(geometry, 30), [geometry]);
  useEffect(() => () => (geometry.dispose(), edges.dispose()), [geometry, edges]);
  const [x, y, z, w] = model.orientation;
  return (
    <group position={model.position} quaternion={[x, y, z, w]}>
      <mesh geometry={geometry}>
        <meshStandardMaterial color={SCENE_COLOURS.object} transparent opacity={0.6} roughness={0.8} depthWrite={false} />
      </mesh>
      <lineSegments geometry={edges}>
        <lineBasicMaterial color={SCENE_COLOURS.objectEdge} />
      </lineSegments>
    </group>
  );
}

function Roller({ roller }: { roller: ViewRoller }) {
  const orientation = useMemo(() => new THREE.Quaternion().setFromUnitVectors(new THREE.Vector3(0, 1, 0), vector(roller.axis).normalize()), [roller.axis]);
  const sphere = roller.kind === 'sphere';
  const scale: Vec3Tuple = sphere ? [roller.radius, roller.radius, roller.radius] : [roller.radius, 2 * roller.halfWidth, roller.radius];
  return (
    <mesh geometry={sphere ? SHARED.sphere : SHARED.cylinder} position={roller.center} quaternion={orientation} scale={scale}>
      <meshStandardMaterial color={SCENE_COLOURS.roller} roughness={0.5} metalness={0.1} />
    </mesh>
  );
}

const Y_AXIS = new THREE.Vector3(0, 1, 0);

/** A solid arrow (shaft and cone) from origin along the unit direction; thick enough to see at any zoom, unlike 1-pixel lines. */
function arrowMesh(origin: THREE.Vector3, direction: THREE.Vector3, length: number, colour: string, shaftRadius: number): THREE.Group {
  const head = Math.min(0.35 * length, 6 * shaftRadius);
  const material = plainMaterial(colour);
  const shaft = new THREE.Mesh(SHARED.shaft, material);
  shaft.scale.set(shaftRadius, length - head, shaftRadius);
  shaft.position.y = (length - head) / 2;
  const cone = new THREE.Mesh(SHARED.cone, material);
  cone.scale.set(2.4 * shaftRadius, head, 2.4 * shaftRadius);
  cone.position.y = length - head / 2;
  const arrow = new THREE.Group().add(shaft, cone);
  arrow.position.copy(origin);
  arrow.quaternion.setFromUnitVectors(Y_AXIS, direction);
  return arrow;
}

/** Finger chains and contact arrows as plain three.js objects (R3F has no element for lines); only the chains' small geometries are new per model. */
function useLineObjects(model: SceneModel) {
  return useMemo(() => {
    const group = new THREE.Group();
    const size = model.bounds.radius;
    for (const chain of model.chains) {
      group.add(new THREE.Line(new THREE.BufferGeometry().setFromPoints(chain.map(vector)), SHARED.chain));
    }
    const arrow = (origin: Vec3Tuple, direction: Vec3Tuple, length: number, colour: string) => {
      if (length > 0) group.add(arrowMesh(vector(origin), vector(direction).normalize(), length, colour, 0.012 * size));
    };
    for (const contact of model.contacts) {
      arrow(contact.point, contact.normal, model.arrows.unitLength, SCENE_COLOURS.normal);
      const speed = Math.hypot(...contact.velocity);
      arrow(contact.point, contact.velocity, speed * model.arrows.lengthPerSpeed, SCENE_COLOURS.velocity);
      if (contact.rollDirection) arrow(contact.point, contact.rollDirection, 0.7 * model.arrows.unitLength, SCENE_COLOURS.roll);
    }
    return group;
  }, [model]);
}

function LinesAndArrows({ model }: { model: SceneModel }) {
  const group = useLineObjects(model);
  useEffect(
    () => () =>
      group.traverse((node) => {
        if (node instanceof THREE.Line) node.geometry.dispose();
      }),
    [group],
  );
  return <primitive object={group} />;
}

/** The palm plane's grid and the palm axes, made once per view and placed and scaled to the scene's bounds. */
function PalmGuides({ center, radius }: { center: Vec3Tuple; radius: number }) {
  const [grid, axes] = useMemo(() => [new THREE.GridHelper(4, 20, PALETTE.rule, PALETTE.grid).rotateX(Math.PI / 2), new THREE.AxesHelper(0.4)], []);
  useEffect(() => () => (grid.dispose(), axes.dispose()), [grid, axes]);
  return (
    <>
      <primitive object={grid} position={[center[0], center[1], 0]} scale={radius} />
      <primitive object={axes} scale={radius} />
    </>
  );
}

/** Orbit, pan and zoom around the scene centre; the camera is placed once per `viewKey` so updates keep the user's view. */
function Controls({ center, radius, viewKey }: { center: Vec3Tuple; radius: number; viewKey: number }) {
  const { camera, gl, invalidate } = useThree();
  useEffect(() => {
    const target = vector(center);
    camera.up.copy(Z_UP);
    camera.position.copy(target.clone().addScaledVector(VIEW_DIRECTION, 3.4 * radius));
    camera.near = radius / 200;
    camera.far = radius * 200;
    camera.lookAt(target);
    camera.updateProjectionMatrix();
    const controls = new OrbitControls(camera, gl.domElement);
    controls.target.copy(target);
    controls.enableDamping = false;
    controls.update();
    controls.addEventListener('change', () => invalidate());
    invalidate();
    return () => controls.dispose();
    // Not on every new centre: re-placing the camera on each result would throw away the user's orbit.
  }, [camera, gl, invalidate, viewKey]);
  return null;
}

/** The three.js scene of a sheet: object, rollers, finger chains, contacts and their arrows, with orbit controls. */
export default function Scene3D({ model, viewKey }: { model: SceneModel; viewKey: number }) {
  return (
    <Canvas
      frameloop="demand"
      dpr={[1, 2]}
      camera={{ fov: 35 }}
      className="h-full w-full touch-none"
      aria-label="3D view of the object, rollers and contacts; drag to orbit, scroll to zoom"
      data-testid="scene-3d"
    >
      <color attach="background" args={[PALETTE.paper]} />
      <ambientLight intensity={1.1} />
      <directionalLight position={[1, -1, 2]} intensity={1.8} />
      <directionalLight position={[-1, 1, 0.5]} intensity={0.6} />
      <Controls center={model.bounds.center} radius={model.bounds.radius} viewKey={viewKey} />
      <SceneObject model={model.object} />
      {model.rollers.map((roller, i) => (
        <Roller key={i} roller={roller} />
      ))}
      {model.contacts.map((contact, i) => (
        <mesh key={i} position={contact.point} geometry={SHARED.contact} material={plainMaterial(SCENE_COLOURS.contact)} scale={model.bounds.radius * 0.02} />
      ))}
      <LinesAndArrows model={model} />
      <PalmGuides center={model.bounds.center} radius={model.bounds.radius} />
    </Canvas>
  );
}
