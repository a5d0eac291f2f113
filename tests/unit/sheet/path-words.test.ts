import { describe, expect, it } from 'vitest';
import { diffDocuments, pathText, setAt } from '../../../src/lib/sheet/document-path';
import { describePath, parsePathText } from '../../../src/lib/sheet/path-words';
import { createSheetFromTemplate, HAND_TEMPLATES } from '../../../src/lib/sheet/templates';

const sheet = createSheetFromTemplate(HAND_TEMPLATES[0]!.id, { kind: 'sphere', radius: 0.03 });

/** Every leaf path of a document (arrays of plain values are leaves too, as the compare page shows them). */
function leafPaths(value: unknown, path: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  if (Array.isArray(value)) value.forEach((item, i) => leafPaths(item, [...path, i], out));
  else if (value !== null && typeof value === 'object') for (const [key, item] of Object.entries(value)) leafPaths(item, [...path, key], out);
  else out.push(path);
  return out;
}

describe('parsePathText', () => {
  it('reads back what pathText writes, for every leaf of a template sheet', () => {
    for (const path of leafPaths(sheet)) expect(parsePathText(pathText(path))).toEqual(path);
    expect(parsePathText('(document)')).toEqual([]);
  });
});

describe('describePath', () => {
  // Field meanings as the sheet format documents them (SheetDocument in src/lib/sheet/types.ts).
  it('names the finger and the joint by position and by name, then the field, then the axis', () => {
    const finger = sheet.hand.fingers[0]!;
    expect(describePath('hand.fingers[0].joints[1].point[2]', sheet)).toBe(`finger 1 (${finger.name}) / joint 2 (${finger.joints[1]!.name}) / point on the axis, z`);
    expect(describePath(['hand', 'fingers', 0, 'roller', 'radius'], sheet)).toBe(`finger 1 (${finger.name}) / roller radius`);
    expect(describePath('hand.fingers[0].joints[0].limits.min', sheet)).toBe(`finger 1 (${finger.name}) / joint 1 (${finger.joints[0]!.name}) / lower limit`);
  });

  it('counts from one and leaves the name out where the document has none', () => {
    expect(describePath('hand.fingers[2].joints[0].axis[0]')).toBe('finger 3 / joint 1 / axis at home, x');
    expect(describePath('hand.fingers[1]')).toBe('finger 2');
  });

  it('says "time step" for the run setting dt (the tick length, s)', () => {
    expect(describePath('motion.run.dt')).toBe('run / time step');
  });

  it('names quaternion parts and object vectors', () => {
    expect(describePath('object.pose.orientation.w')).toBe('object / orientation, w');
    expect(describePath('object.twist.angular[1]')).toBe('object / angular velocity, y');
    expect(describePath('tags[1]')).toBe('tag 2');
    expect(describePath('(document)')).toBe('the whole sheet');
  });

  it('puts an unknown key into words instead of showing it raw', () => {
    expect(describePath('solver.someNewSetting')).toBe('solver, some new setting');
  });

  it('gives every leaf of a template sheet its own wording, without brackets or dotted keys', () => {
    const seen = new Map<string, string>();
    for (const path of leafPaths(sheet)) {
      const words = describePath(path, sheet);
      expect(words).not.toMatch(/[[\].]|[a-z][A-Z]/);
      expect(seen.get(words), `${pathText(path)} and ${seen.get(words)} read alike`).toBeUndefined();
      seen.set(words, pathText(path));
    }
    expect(seen.size).toBeGreaterThan(30);
  });

  it('names each change the compare page lists between two revisions', () => {
    const changed = setAt(setAt(sheet, ['hand', 'fingers', 1, 'roller', 'radius'], '15 mm'), ['motion', 'run', 'dt'], 0.002);
    expect(diffDocuments(sheet, changed).map((c) => describePath(c.path, changed))).toEqual([
      `finger 2 (${sheet.hand.fingers[1]!.name}) / roller radius`,
      'run / time step',
    ]);
  });
});
