// The 3-D scene as straylight keeps it: plain data (it crosses to worker threads by structured
// clone). A glTF file is read into this form once (io/scene-read.ts); the shot keeps, per camera
// and light, only the chain of nodes from the scene's root down to it.

export type Vec3 = [number, number, number];
/** unit quaternion in glTF's order (x, y, z, w) */
export type Quat = [number, number, number, number];

/** One glTF animation sampler (glTF 2.0, 3.11 Animations): key times in seconds and values. */
export interface SceneSampler {
  interpolation: 'LINEAR' | 'STEP' | 'CUBICSPLINE';
  times: number[];
  /** per key: the value (LINEAR, STEP) or in-tangent, value, out-tangent (CUBICSPLINE), flattened */
  values: number[];
  /** components per value: 3 (translation, scale) or 4 (rotation) */
  size: 3 | 4;
}

/** One node's local transform at rest and the channels that animate it. */
export interface SceneNode {
  name: string;
  /** index of the parent in the scene's node list, -1 at a root */
  parent: number;
  translation: Vec3;
  rotation: Quat;
  scale: Vec3;
  anim: { translation?: SceneSampler; rotation?: SceneSampler; scale?: SceneSampler };
}

export interface SceneCamera {
  type: 'perspective' | 'orthographic';
  /** vertical field of view, radians (perspective) */
  yfov: number;
  /** width over height the camera was made for; absent: the frame's */
  aspectRatio?: number;
}

/** A KHR_lights_punctual light: colour linear RGB, intensity in candela (point, spot) or lux (directional). */
export interface SceneLight {
  type: 'point' | 'spot' | 'directional';
  colour: Vec3;
  intensity: number;
  /** distance beyond which the light has no effect (absent: infinite) */
  range?: number;
  /** spot cone half-angles, radians */
  innerCone: number;
  outerCone: number;
}

/** A scene file read: every node, and the cameras and lights attached to nodes. */
export interface SceneData {
  nodes: SceneNode[];
  cameras: Record<number, SceneCamera>;
  lights: Record<number, SceneLight>;
  /** the time of the last animation key, seconds (0: nothing animated) */
  duration: number;
}

/** A node and its ancestors, root first: all that is needed to place it at any time. */
export type NodeChain = SceneNode[];
