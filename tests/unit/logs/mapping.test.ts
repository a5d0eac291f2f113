import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
// ajv 8 is an independent JSON Schema validator (draft 2020-12 build).
import Ajv2020 from 'ajv/dist/2020';
// gl-matrix is an independent quaternion library: vec3.transformQuat turns a vector by a quaternion [x, y, z, w].
import { glMatrix, vec3 as glVec3 } from 'gl-matrix';
import { describe, expect, it } from 'vitest';
import { LOG_MAPPING_JSON_SCHEMA_PATH, createLogMappingJsonSchema, logMappingJsonSchemaText } from '../../../src/lib/logs/json-schema';
import { parseLogMapping } from '../../../src/lib/logs/mapping';
import { quaternionFromRollPitchYaw } from '../../../src/lib/logs/read-log';

glMatrix.setMatrixArrayType(Array);

const repoRoot = new URL('../../../', import.meta.url);
const docsText = readFileSync(new URL('content/docs/log-mapping.md', repoRoot), 'utf8');
const exampleMapping = (): Record<string, any> => JSON.parse(/```json\n([\s\S]*?)```/.exec(docsText)![1]!);
const validate = new Ajv2020({ allErrors: true, strict: true }).compile(createLogMappingJsonSchema());

describe('the log mapping JSON Schema', () => {
  it('equals the committed file (run src/cli/write-log-mapping-schema.ts after changing the schema)', () => {
    expect(readFileSync(fileURLToPath(new URL(`public${LOG_MAPPING_JSON_SCHEMA_PATH}`, repoRoot)), 'utf8')).toBe(logMappingJsonSchemaText());
  });

  it('accepts the documented example, which parseLogMapping also accepts', () => {
    const example = exampleMapping();
    expect(validate(example), JSON.stringify(validate.errors)).toBe(true);
    expect(parseLogMapping(example).ok).toBe(true);
  });

  const faults: [string, (m: Record<string, any>) => void, string, string][] = [
    ['wrong format', (m) => (m.format = 'slipless.sheet'), '/format', 'format'],
    ['unknown field', (m) => (m.colour = 'red'), '', 'colour'],
    ['time unit hours', (m) => (m.time.unit = 'h'), '/time/unit', 'time.unit'],
    ['two position columns', (m) => (m.pose.position.columns = ['a', 'b']), '/pose/position/columns', 'pose.position.columns'],
    ['angle unit on a rate', (m) => (m.joints[0].commandedRate.unit = 'deg'), '/joints/0/commandedRate/unit', 'joints[0].commandedRate.unit'],
    ['rate unit on an angle', (m) => (m.joints[0].angle.unit = 'rpm'), '/joints/0/angle/unit', 'joints[0].angle.unit'],
    ['empty column name', (m) => (m.time.column = ''), '/time/column', 'time.column'],
    ['tolerance as a number', (m) => (m.tolerances.rate = 0.05), '/tolerances/rate', 'tolerances.rate'],
    ['negative period', (m) => (m.time.period = -1), '/time/period', 'time.period'],
  ];

  it.each(faults)('rejects %s in both validators at the same field', (_, change, schemaPath, parsePath) => {
    const mapping = exampleMapping();
    change(mapping);
    expect(validate(mapping)).toBe(false);
    expect(validate.errors?.some((e) => e.instancePath.startsWith(schemaPath))).toBe(true);
    const read = parseLogMapping(mapping);
    expect(read.ok).toBe(false);
    if (!read.ok) expect(read.issues.map((issue) => issue.path)).toContain(parsePath);
  });
});

describe('parseLogMapping', () => {
  it('reads tolerances with units through mathjs into SI (1 deg = pi/180 rad, 1 mm = 0.001 m; definitions)', () => {
    const mapping = exampleMapping();
    mapping.tolerances = { rate: '3 deg/s', slip: '1.5 mm/s' };
    const read = parseLogMapping(mapping);
    expect(read.ok).toBe(true);
    if (!read.ok) return;
    expect([read.mapping.tolerances.rate, read.mapping.tolerances.slip]).toBeNear([(3 * Math.PI) / 180, 0.0015], { rel: 1e-15 });
  });

  it.each([
    ['a slip tolerance that is a length', { rate: '0.05 rad/s', slip: '1 mm' }, 'tolerances.slip', /expected a speed/],
    ['a rate tolerance of zero', { rate: '0 rad/s', slip: '1 mm/s' }, 'tolerances.rate', /greater than 0/],
    ['a slip tolerance of 1 km/s', { rate: '0.05 rad/s', slip: '1 km/s' }, 'tolerances.slip', /at most 100/],
    ['a tolerance that is not a quantity', { rate: 'fast', slip: '1 mm/s' }, 'tolerances.rate', /.+/],
  ])('refuses %s, naming the field', (_, tolerances, path, message) => {
    const mapping = exampleMapping();
    mapping.tolerances = tolerances;
    const read = parseLogMapping(mapping);
    expect(read.ok).toBe(false);
    if (read.ok) return;
    const issue = read.issues.find((i) => i.path === path);
    expect(issue?.message).toMatch(message);
  });

  it('refuses a joint mapped twice, naming the second entry', () => {
    const mapping = exampleMapping();
    mapping.joints.push({ ...mapping.joints[0] });
    const read = parseLogMapping(mapping);
    expect(!read.ok && read.issues).toEqual([{ path: `joints[${mapping.joints.length - 1}].joint`, message: `joint "${mapping.joints[0].joint}" is mapped twice` }]);
  });
});

describe('roll-pitch-yaw orientations', () => {
  // Elementary rotations about x, y and z (Craig, "Introduction to Robotics", Sec. 2.8).
  const rx = (a: number) => [[1, 0, 0], [0, Math.cos(a), -Math.sin(a)], [0, Math.sin(a), Math.cos(a)]];
  const ry = (a: number) => [[Math.cos(a), 0, Math.sin(a)], [0, 1, 0], [-Math.sin(a), 0, Math.cos(a)]];
  const rz = (a: number) => [[Math.cos(a), -Math.sin(a), 0], [Math.sin(a), Math.cos(a), 0], [0, 0, 1]];
  const product = (a: number[][], b: number[][]) => a.map((row) => [0, 1, 2].map((j) => row.reduce((sum, v, k) => sum + v * b[k]![j]!, 0)));
  const apply = (m: number[][], v: number[]) => m.map((row) => row.reduce((sum, x, k) => sum + x * v[k]!, 0));

  it.each([
    ['zyx', (r: number, p: number, y: number) => product(product(rz(y), ry(p)), rx(r))],
    ['xyz', (r: number, p: number, y: number) => product(product(rx(r), ry(p)), rz(y))],
  ] as const)('convention %s turns vectors as the product of elementary rotations', (convention, matrix) => {
    const [roll, pitch, yaw] = [0.3, -0.7, 1.9];
    const q = quaternionFromRollPitchYaw(roll, pitch, yaw, convention, new Float64Array(4));
    for (const v of [[1, 0, 0], [0, 1, 0], [0.2, -0.5, 0.9]]) {
      const turned = glVec3.transformQuat(glVec3.create(), v as [number, number, number], Array.from(q) as [number, number, number, number]);
      expect(Array.from(turned)).toBeNear(apply(matrix(roll, pitch, yaw), v), { abs: 1e-12 });
    }
  });
});
