import { Component, lazy, Suspense, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import type { PlainSheetResult } from '../../lib/kinematics';
import type { SheetDocument } from '../../lib/sheet/types';
import { SCENE_COLOURS } from '../../lib/view/palette';
import { buildSceneModel, type SceneModel } from '../../lib/view/scene-model';
import { secondaryButton } from '../form-parts';
import SceneFallback from './SceneFallback';
import { whenIdle } from './useIdle';

/** three.js and React Three Fiber load only once the view is on screen, keeping them out of the page's first script. */
const Scene3D = lazy(() => import('./Scene3D'));

/** Whether this browser can give a canvas a WebGL context (the context is released again at once). */
export function hasWebGL(): boolean {
  try {
    const canvas = document.createElement('canvas');
    const gl = (canvas.getContext('webgl2') ?? canvas.getContext('webgl')) as WebGLRenderingContext | null;
    if (!gl) return false;
    gl.getExtension('WEBGL_lose_context')?.loseContext();
    return true;
  } catch {
    return false;
  }
}

/** Falls back to the SVG views if the 3D scene fails to load or to render. */
class FallbackOnError extends Component<{ fallback: ReactNode; children: ReactNode }, { failed: boolean }> {
  state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  render() {
    return this.state.failed ? this.props.fallback : this.props.children;
  }
}

function Swatch({ colour, shape }: { colour: string; shape: 'dot' | 'arrow' | 'block' | 'line' }) {
  return (
    <svg width="18" height="10" viewBox="0 0 18 10" aria-hidden="true" className="shrink-0">
      {shape === 'block' && <rect x="1" y="1" width="16" height="8" fill={colour} stroke={SCENE_COLOURS.objectEdge} strokeWidth="0.8" />}
      {shape === 'dot' && <circle cx="9" cy="5" r="3.5" fill={colour} />}
      {shape === 'line' && <line x1="1" y1="5" x2="17" y2="5" stroke={colour} strokeWidth="1.6" />}
      {shape === 'arrow' && (
        <>
          <line x1="1" y1="5" x2="12" y2="5" stroke={colour} strokeWidth="1.6" />
          <path d="M11,1.5 L17,5 L11,8.5 z" fill={colour} />
        </>
      )}
    </svg>
  );
}

function Legend({ model, threeD }: { model: SceneModel; threeD: boolean }) {
  const speed = model.arrows.maxSpeed;
  const items: [string, string, 'dot' | 'arrow' | 'block' | 'line'][] = [
    ['Object', SCENE_COLOURS.object, 'block'],
    ['Rollers', SCENE_COLOURS.roller, 'block'],
    ['Finger chain (joint points)', SCENE_COLOURS.chain, 'line'],
    ['Contact point', SCENE_COLOURS.contact, 'dot'],
    ['Contact normal (outward)', SCENE_COLOURS.normal, 'arrow'],
    [`Object velocity at the contact (longest = ${(speed * 1000).toPrecision(3)} mm/s)`, SCENE_COLOURS.velocity, 'arrow'],
    ['Roll direction of the roller surface', SCENE_COLOURS.roll, 'arrow'],
  ];
  return (
    <ul className="grid grid-cols-1 gap-x-4 gap-y-0.5 text-xs text-graphite sm:grid-cols-2" aria-label="Legend" data-testid="scene-legend">
      {items.map(([label, colour, shape]) => (
        <li key={label} className="flex items-center gap-1.5">
          <Swatch colour={colour} shape={shape} />
          {label}
        </li>
      ))}
      {threeD && <li className="sm:col-span-2">Axes at the palm centre: x red, y green, z blue; the grid is the palm plane.</li>}
    </ul>
  );
}

/**
 * Sticky view of the sheet's object, rollers, contacts, normals and velocity arrows at the solved
 * state (the home configuration until there is a result): 3D where WebGL works, else three
 * orthographic SVG views.
 */
export default function SceneView({ document, result }: { document: SheetDocument; result: PlainSheetResult | null }) {
  const model = useMemo(() => buildSceneModel(document, result), [document, result]);
  const [open, setOpen] = useState(true);
  const [onScreen, setOnScreen] = useState(false);
  const [webgl, setWebgl] = useState<boolean | null>(null);
  const [viewKey, setViewKey] = useState(0);
  const boxRef = useRef<HTMLDivElement>(null);

  // A WebGL context takes a good part of a second to create in a software renderer: probed once the page is idle, never before the first frame.
  useEffect(() => whenIdle(() => setWebgl(hasWebGL())), []);

  useEffect(() => {
    const box = boxRef.current;
    if (!box || onScreen) return;
    const observer = new IntersectionObserver((entries) => {
      if (entries.some((entry) => entry.isIntersecting)) setOnScreen(true);
    });
    observer.observe(box);
    return () => observer.disconnect();
  }, [open, onScreen]);

  const fallback = <SceneFallback model={model} />;
  const threeD = webgl === true;
  return (
    <section className="sticky top-4 space-y-2 border-2 border-ink bg-paper p-3" aria-label="Scene view" data-testid="scene-view" data-webgl={webgl === null ? 'unknown' : String(webgl)}>
      <header className="flex items-center gap-2">
        <h3 className="text-sm font-semibold">{threeD ? '3D view' : 'Orthographic views'}</h3>
        <span className="text-xs text-graphite">{result ? 'at the solved state' : 'home configuration, not solved yet'}</span>
        <span className="ml-auto flex gap-2">
          {open && threeD && (
            <button type="button" className={secondaryButton} onClick={() => setViewKey((k) => k + 1)}>
              Reset view
            </button>
          )}
          <button type="button" className={secondaryButton} onClick={() => setOpen((o) => !o)} aria-expanded={open}>
            {open ? 'Hide' : 'Show'}
          </button>
        </span>
      </header>
      {open && (
        <>
          <div ref={boxRef} className={threeD ? 'aspect-[4/3] w-full border border-rule' : ''}>
            {threeD && onScreen && (
              <FallbackOnError fallback={fallback}>
                <Suspense fallback={<p className="p-4 text-sm text-graphite">Loading the 3D view…</p>}>
                  <Scene3D model={model} viewKey={viewKey} />
                </Suspense>
              </FallbackOnError>
            )}
            {webgl === false && fallback}
          </div>
          <Legend model={model} threeD={threeD} />
        </>
      )}
    </section>
  );
}
