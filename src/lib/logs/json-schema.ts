/**
 * The log mapping format as JSON Schema (draft 2020-12), for editors and other tools. It
 * describes what may be written; the tolerance units and the joint names (which must exist in
 * the sheet) are checked only by the application.
 */
import { z } from 'zod';
import { LOG_MAPPING_VERSION, logMappingMetadata, logMappingSchema } from './mapping';

/** Site path at which the JSON Schema of the current mapping format version is served. */
export const LOG_MAPPING_JSON_SCHEMA_PATH = `/schema/log-mapping-v${LOG_MAPPING_VERSION}.json`;

/** JSON Schema (draft 2020-12) of the log mapping as written. */
export function createLogMappingJsonSchema(): Record<string, unknown> {
  const generated = z.toJSONSchema(logMappingSchema, { io: 'input', target: 'draft-2020-12', unrepresentable: 'throw', metadata: logMappingMetadata });
  const { $schema, ...rest } = generated;
  return {
    $schema,
    title: `Slipless log mapping, format version ${LOG_MAPPING_VERSION}`,
    description:
      'Which columns of a controller log (CSV with a header line) hold the time, the object pose, each sheet joint\'s angle and commanded and measured rates, and an optional wanted twist, with their units; and the tolerances a comparison judges by, as strings with a unit such as "0.05 rad/s" and "1 mm/s". Tolerance units and joint names are checked by the application.',
    ...rest,
  };
}

/** The JSON Schema as the text of the committed file (two-space indent, trailing newline). */
export function logMappingJsonSchemaText(): string {
  return `${JSON.stringify(createLogMappingJsonSchema(), null, 2)}\n`;
}
