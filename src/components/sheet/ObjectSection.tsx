import { memo } from 'react';
import { useDocumentSelect, useDocumentAt, useSheetFields } from './editor-context';
import { getAt } from '../../lib/sheet/document-path';
import { Choice, ComponentHeads, DirectionVector, HIDDEN_LABELS, PlainNumber, Quantity, QuantityVector, samePropsByPath } from './fields';
import { selectInput } from './sheet-styles';

const SHAPES = ['sphere', 'box', 'cylinder', 'capsule', 'ellipsoid'] as const;

/** Dimensions of a new shape of that kind, as written (unit strings). */
export function defaultShape(kind: string): Record<string, unknown> {
  switch (kind) {
    case 'box':
      return { kind, halfExtents: ['20 mm', '20 mm', '20 mm'], filletRadius: '2 mm' };
    case 'cylinder':
    case 'capsule':
      return { kind, radius: '12 mm', halfLength: '25 mm' };
    case 'ellipsoid':
      return { kind, semiAxes: ['30 mm', '24 mm', '20 mm'] };
    default:
      return { kind: 'sphere', radius: '30 mm' };
  }
}

/** The orientation of a pose, as a unit quaternion or an axis and angle, at path. */
export const OrientationFields = memo(function OrientationFields({ path }: { path: (string | number)[] }) {
  const { update, readOnly } = useSheetFields();
  const form = useDocumentSelect((document) => {
    const orientation = getAt(document, path);
    return orientation !== null && typeof orientation === 'object' && 'axis' in orientation ? 'axis-angle' : 'quaternion';
  });
  return (
    <div className="space-y-2">
      <label className="flex items-center gap-2 text-[11px] uppercase tracking-wide text-graphite">
        orientation as
        <select
          className={selectInput}
          disabled={readOnly}
          value={form}
          onChange={(event) => update(path, event.target.value === 'axis-angle' ? { axis: [0, 0, 1], angle: '0 deg' } : { w: 1, x: 0, y: 0, z: 0 })}
        >
          <option value="quaternion">unit quaternion</option>
          <option value="axis-angle">axis and angle</option>
        </select>
      </label>
      {form === 'axis-angle' ? (
        <div className="grid grid-cols-[3fr_1fr] gap-3">
          <DirectionVector path={[...path, 'axis']} label="rotation axis" />
          <Quantity path={[...path, 'angle']} label="rotation angle" kind="angle" />
        </div>
      ) : (
        <div>
          <ComponentHeads parts={['w', 'x', 'y', 'z']} />
          <div className={`grid grid-cols-4 gap-2 ${HIDDEN_LABELS}`}>
            {(['w', 'x', 'y', 'z'] as const).map((c) => (
              <PlainNumber key={c} path={[...path, c]} label={`orientation quaternion ${c}`} />
            ))}
          </div>
        </div>
      )}
    </div>
  );
}, samePropsByPath);

/** Object: shape and dimensions, pose. */
function ObjectSection() {
  const { update } = useSheetFields();
  const shapeKind = useDocumentAt(['object', 'shape', 'kind']);
  const at = (...rest: string[]) => ['object', 'shape', ...rest];
  return (
    <div className="space-y-4">
      <div className="grid grid-cols-[10rem_1fr] items-end gap-4">
        <Choice path={['object', 'shape', 'kind']} label="shape" options={SHAPES} onChoose={(kind) => update(['object', 'shape'], defaultShape(kind))} />
        <div className="grid grid-cols-3 gap-3">
          {shapeKind === 'sphere' && <Quantity path={at('radius')} label="radius" kind="length" plausible="object" />}
          {(shapeKind === 'cylinder' || shapeKind === 'capsule') && (
            <>
              <Quantity path={at('radius')} label="radius" kind="length" plausible="object" />
              <Quantity path={at('halfLength')} label="half length" kind="length" plausible="object" />
            </>
          )}
          {shapeKind === 'box' && <Quantity path={at('filletRadius')} label="fillet radius" kind="length" />}
        </div>
      </div>
      {shapeKind === 'box' && <QuantityVector path={at('halfExtents')} label="half extents" kind="length" plausible="object" />}
      {shapeKind === 'ellipsoid' && <QuantityVector path={at('semiAxes')} label="semi-axes" kind="length" plausible="object" />}
      <QuantityVector path={['object', 'pose', 'position']} label="position of the object origin (palm frame)" kind="length" />
      <OrientationFields path={['object', 'pose', 'orientation']} />
    </div>
  );
}

export default memo(ObjectSection);
