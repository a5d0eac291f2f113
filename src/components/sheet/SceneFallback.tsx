import { useId } from 'react';
import type { Vec3Tuple } from '../../lib/sheet/types';
import { ORTHOGRAPHIC_VIEWS, depth, project, silhouette, toSvg, type OrthographicView } from '../../lib/view/orthographic';
import { SCENE_COLOURS } from '../../lib/view/palette';
import { arrowEnd, objectSupport, rollerSupport, type SceneModel } from '../../lib/view/scene-model';

const MARGIN = 1.15;
const ARROWS = [
  ['normal', SCENE_COLOURS.normal],
  ['velocity', SCENE_COLOURS.velocity],
  ['roll', SCENE_COLOURS.roll],
] as const;

const svgPoint = (p: Vec3Tuple, view: OrthographicView) => toSvg(project(p, view));
const points = (outline: [number, number][]) => outline.map(([u, v]) => toSvg([u, v]).join(',')).join(' ');

/** One orthographic view drawn back to front: palm line, object and rollers by depth, chains, then contacts and arrows on top. */
function ViewPanel({ model, view }: { model: SceneModel; view: OrthographicView }) {
  const id = useId();
  const r = model.bounds.radius * MARGIN;
  const [cu, cv] = svgPoint(model.bounds.center, view);
  const stroke = model.bounds.radius / 160;
  const head = model.bounds.radius * 0.05;
  const bodies = [
    { key: 'object', depth: depth(model.object.position, view), outline: silhouette((d) => objectSupport(model.object, d), view), fill: SCENE_COLOURS.object, opacity: 0.75 },
    ...model.rollers.map((roller, i) => ({
      key: `roller-${i}`,
      depth: depth(roller.center, view),
      outline: silhouette((d) => rollerSupport(roller, d), view, 32),
      fill: SCENE_COLOURS.roller,
      opacity: 0.9,
    })),
  ].sort((a, b) => a.depth - b.depth);
  const arrow = (key: string, from: Vec3Tuple, to: Vec3Tuple, kind: (typeof ARROWS)[number][0], colour: string) => {
    const [x1, y1] = svgPoint(from, view);
    const [x2, y2] = svgPoint(to, view);
    if (Math.hypot(x2 - x1, y2 - y1) < 1e-9) return null;
    return <line key={key} x1={x1} y1={y1} x2={x2} y2={y2} stroke={colour} strokeWidth={1.6 * stroke} markerEnd={`url(#${id}-${kind})`} />;
  };
  const palmVisible = view.name !== 'top';
  return (
    <figure className="min-w-0">
      <svg viewBox={`${cu - r} ${cv - r} ${2 * r} ${2 * r}`} className="aspect-square w-full border border-rule bg-paper" role="img" aria-label={view.label} data-view={view.name}>
        <defs>
          {ARROWS.map(([kind, colour]) => (
            <marker key={kind} id={`${id}-${kind}`} viewBox="0 0 10 10" refX="9" refY="5" markerWidth={head} markerHeight={head} markerUnits="userSpaceOnUse" orient="auto">
              <path d="M0,0 L10,5 L0,10 z" fill={colour} />
            </marker>
          ))}
        </defs>
        {palmVisible && (
          <line x1={cu - r} x2={cu + r} y1={0} y2={0} stroke={SCENE_COLOURS.chain} strokeWidth={stroke} strokeDasharray={`${4 * stroke} ${3 * stroke}`} />
        )}
        {bodies.map((body) => (
          <polygon key={body.key} data-part={body.key} points={points(body.outline)} fill={body.fill} fillOpacity={body.opacity} stroke={SCENE_COLOURS.objectEdge} strokeWidth={stroke} />
        ))}
        {model.chains.map((chain, i) => (
          <polyline key={i} points={chain.map((p) => svgPoint(p, view).join(',')).join(' ')} fill="none" stroke={SCENE_COLOURS.chain} strokeWidth={1.4 * stroke} />
        ))}
        {model.contacts.map((c, i) => (
          <g key={i} data-part="contact">
            {arrow('n', c.point, arrowEnd(c.point, c.normal, model.arrows.unitLength), 'normal', SCENE_COLOURS.normal)}
            {arrow('v', c.point, arrowEnd(c.point, c.velocity, model.arrows.lengthPerSpeed), 'velocity', SCENE_COLOURS.velocity)}
            {c.rollDirection && arrow('r', c.point, arrowEnd(c.point, c.rollDirection, 0.7 * model.arrows.unitLength), 'roll', SCENE_COLOURS.roll)}
            <circle cx={svgPoint(c.point, view)[0]} cy={svgPoint(c.point, view)[1]} r={model.bounds.radius * 0.022} fill={SCENE_COLOURS.contact} />
          </g>
        ))}
      </svg>
      <figcaption className="mt-1 text-xs text-graphite">
        {view.label} · <span className="num">{view.axes[0]}</span> right, <span className="num">{view.axes[1]}</span> up
      </figcaption>
    </figure>
  );
}

/** Top, front and side orthographic views in SVG, for browsers without WebGL. */
export default function SceneFallback({ model }: { model: SceneModel }) {
  return (
    <div className="grid grid-cols-[repeat(auto-fit,minmax(150px,1fr))] gap-2" data-testid="scene-fallback">
      {ORTHOGRAPHIC_VIEWS.map((view) => (
        <ViewPanel key={view.name} model={model} view={view} />
      ))}
    </div>
  );
}
