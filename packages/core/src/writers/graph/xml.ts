import { XMLBuilder } from 'fast-xml-parser';

/** XML text of an element tree in fast-xml-parser's form (`@_name` attributes, arrays for repeated elements), with a declaration. */
export function xmlDocument(root: Record<string, unknown>): string {
  const builder = new XMLBuilder({ ignoreAttributes: false, attributeNamePrefix: '@_', format: true, indentBy: '  ', suppressEmptyNode: true, suppressBooleanAttributes: false });
  return builder.build({ '?xml': { '@_version': '1.0', '@_encoding': 'UTF-8' }, ...root }) as string;
}

/** An attribute value as XML text: numbers as JSON writes them, booleans as true/false. */
export const xmlValue = (v: string | number | boolean): string => (typeof v === 'string' ? v : String(v));
