/**
 * The sheet document format as JSON Schema (draft 2020-12), for editors and other tools.
 * It describes what may be written (unit strings, optional fields with defaults), not the parsed
 * SI result; checks that JSON Schema cannot state (unit dimensions, unit quaternions, limit order,
 * unique names, sweep paths) happen only in `parseSheet`.
 */
import { z } from 'zod';
import { SHEET_VERSION, sheetSchema, sheetSchemaMetadata } from './schema';

/** Site path at which the JSON Schema of the current format version is served. */
export const SHEET_JSON_SCHEMA_PATH = `/schema/sheet-v${SHEET_VERSION}.json`;

/** JSON Schema (draft 2020-12) of the sheet document as written (input side, quantities as numbers or unit strings). */
export function createSheetJsonSchema(): Record<string, unknown> {
  const generated = z.toJSONSchema(sheetSchema, {
    io: 'input',
    target: 'draft-2020-12',
    unrepresentable: 'throw',
    metadata: sheetSchemaMetadata,
  });
  const { $schema, ...rest } = generated;
  return {
    $schema,
    title: `Slipless sheet document, format version ${SHEET_VERSION}`,
    description:
      'Quantities are plain numbers in SI units (m, rad, s), strings with a unit such as "12 mm", or expressions with units over the sheet variables such as "rollerRadius + 2 mm". Unit dimensions, unit quaternions, joint limit order, unique names and sweep paths are checked by the application when the sheet is read.',
    ...rest,
  };
}

/** The JSON Schema as the text of the committed file (two-space indent, trailing newline). */
export function sheetJsonSchemaText(): string {
  return `${JSON.stringify(createSheetJsonSchema(), null, 2)}\n`;
}
