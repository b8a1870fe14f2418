import type { InjectionKey } from 'vue'
import { Group } from 'three'
import type { V3 } from '~~/utils/viewer-math'

/** A "look along" button: the camera looks in direction `dir` (scene frame, unit). */
export interface ViewerView {
  key: string
  label: string
  title: string
  dir: V3
  /** Screen-up for this view (scene frame, unit, perpendicular to dir); default: keep the current up. */
  up?: V3
}

/** Settings the frame's controls change and the stage reads each frame. */
export interface StageSettings {
  orthographic: boolean
  wireframe: boolean
  turntable: boolean
  gizmo: boolean
  /** Sun direction: azimuth and elevation, degrees (view frame or body frame, see sunFixedToBody). */
  sunAzimuthDeg: number
  sunElevationDeg: number
  sunFixedToBody: boolean
}

/** What the stage offers the frame once the renderer is up. */
export interface StageApi {
  reset: () => void
  fit: () => void
  viewAlong: (dir: V3, up?: V3) => void
  /** Turns the view about the screen's vertical (yaw) and horizontal (pitch) axes, radians. */
  turn: (yaw: number, pitch: number) => void
  /** factor > 1 zooms in. */
  zoom: (factor: number) => void
  /** Draws one frame now (synchronously) and returns the canvas, for PNG export. */
  drawNow: () => HTMLCanvasElement
  invalidate: () => void
}

/** Readouts the stage updates when they change (not every frame). */
export interface StageReadout {
  /** Metres per CSS pixel in orthographic projection, else null. */
  worldPerPixel: number | null
  canvasWidth: number
  canvasHeight: number
}

export interface StageLink {
  /** Everything drawn; the owner (lobe or joined view) fills and disposes it. */
  root: Group
  settings: StageSettings
  readout: StageReadout
  api: StageApi | null
  /** Set by the owner when the meshes are in `root` (first content frame is timed from then). */
  contentReady: boolean
  /** Bumped by the owner when `root` changed shape (fit and redraw). */
  contentVersion: number
  /** The frame's element, where the stage writes test/bench data attributes. */
  el: HTMLElement | null
}

export const STAGE_LINK: InjectionKey<StageLink> = Symbol('viewer-stage')

export function createStageLink(): StageLink {
  return reactive({
    root: markRaw(new Group()),
    settings: {
      orthographic: false,
      wireframe: false,
      turntable: false,
      gizmo: true,
      sunAzimuthDeg: -35,
      sunElevationDeg: 30,
      sunFixedToBody: false,
    },
    readout: { worldPerPixel: null, canvasWidth: 0, canvasHeight: 0 },
    api: null,
    contentReady: false,
    contentVersion: 0,
    el: null,
  }) as StageLink
}
