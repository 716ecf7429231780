/**
 * TypeORM's naming rules, rewritten from the behaviour of its `DefaultNamingStrategy` and of the
 * community snake-case strategy (the `typeorm-naming-strategies` package), so that names come out
 * as the database would call them. Checked against both in the oracle tests.
 */

/** TypeORM's `camelCase` (util/StringUtils): `tool_id` -> `toolId`, `Tool` -> `tool`. */
export function camelCase(str: string, firstCapital = false): string {
  if (firstCapital) str = ' ' + str;
  return str.replace(/^([A-Z])|[\s\-_](\w)/g, (_m, p1: string | undefined, p2: string | undefined) => (p2 ? p2.toUpperCase() : p1!.toLowerCase()));
}

/** TypeORM's `snakeCase`: `ToolCategory` -> `tool_category`, `HTMLPage` -> `html_page`. */
export function snakeCase(str: string): string {
  return str
    .replace(/([A-Z])([A-Z])([a-z])/g, '$1_$2$3')
    .replace(/([a-z0-9])([A-Z])/g, '$1_$2')
    .toLowerCase();
}

/** TypeORM's `titleCase`: every word's first letter upper case, the rest lower case. */
export function titleCase(str: string): string {
  return str.replace(/\w\S*/g, (txt) => txt.charAt(0).toUpperCase() + txt.substring(1).toLowerCase());
}

/** TypeORM's `shorten`, used for junction table names longer than the driver's alias limit. */
export function shorten(input: string, options: { segmentLength?: number; separator?: string; termLength?: number } = {}): string {
  const { segmentLength = 4, separator = '__', termLength = 2 } = options;
  return input
    .split(separator)
    .map((val) => {
      const terms = val.replace(/([a-z\xE0-\xFF])([A-Z\xC0-\xDF])/g, '$1 $2').split(' ');
      const length = terms.length > 1 ? termLength : segmentLength;
      return terms.map((t) => t.substring(0, length)).join('');
    })
    .join(separator);
}

/** The rules of one naming strategy, as the schema builder calls them. */
export interface NamingRules {
  readonly name: 'default' | 'snake';
  tableName(targetName: string, userSpecifiedName: string | undefined): string;
  columnName(propertyName: string, customName: string | undefined, embeddedPrefixes: string[]): string;
  joinColumnName(relationName: string, referencedColumnName: string): string;
  joinTableName(firstTableName: string, secondTableName: string, firstPropertyName: string, secondPropertyName: string): string;
  joinTableColumnName(tableName: string, propertyName: string, columnName?: string): string;
  joinTableInverseColumnName(tableName: string, propertyName: string, columnName?: string): string;
  joinTableColumnDuplicationPrefix(columnName: string, index: number): string;
  closureJunctionTableName(originalClosureTableName: string): string;
  prefixTableName(prefix: string, tableName: string): string;
  readonly materializedPathColumnName: string;
  readonly nestedSetColumnNames: { left: string; right: string };
}

/** TypeORM's DefaultNamingStrategy. */
export const DEFAULT_NAMING: NamingRules = Object.freeze({
  name: 'default' as const,
  tableName: (targetName: string, userSpecifiedName: string | undefined) => userSpecifiedName || snakeCase(targetName),
  columnName(propertyName: string, customName: string | undefined, embeddedPrefixes: string[]): string {
    const name = customName || propertyName;
    if (embeddedPrefixes.length) return camelCase(embeddedPrefixes.join('_')) + titleCase(name);
    return name;
  },
  joinColumnName: (relationName: string, referencedColumnName: string) => camelCase(relationName + '_' + referencedColumnName),
  joinTableName: (first: string, second: string, firstProperty: string) => snakeCase(first + '_' + firstProperty.replace(/\./g, '_') + '_' + second),
  joinTableColumnName: (tableName: string, propertyName: string, columnName?: string) => camelCase(tableName + '_' + (columnName ? columnName : propertyName)),
  joinTableInverseColumnName: (tableName: string, propertyName: string, columnName?: string) => camelCase(tableName + '_' + (columnName ? columnName : propertyName)),
  joinTableColumnDuplicationPrefix: (columnName: string, index: number) => columnName + '_' + index,
  closureJunctionTableName: (original: string) => original + '_closure',
  prefixTableName: (prefix: string, tableName: string) => prefix + tableName,
  materializedPathColumnName: 'mpath',
  nestedSetColumnNames: { left: 'nsleft', right: 'nsright' },
});

/** The snake-case strategy of the widely used community package (and of most hand-written copies). */
export const SNAKE_NAMING: NamingRules = Object.freeze({
  ...DEFAULT_NAMING,
  name: 'snake' as const,
  tableName: (className: string, customName: string | undefined) => (customName ? customName : snakeCase(className)),
  columnName: (propertyName: string, customName: string | undefined, embeddedPrefixes: string[]) =>
    snakeCase(embeddedPrefixes.concat('').join('_')) + (customName ? customName : snakeCase(propertyName)),
  joinColumnName: (relationName: string, referencedColumnName: string) => snakeCase(relationName + '_' + referencedColumnName),
  joinTableName: (first: string, second: string, firstProperty: string) => snakeCase(first + '_' + firstProperty.replace(/\./g, '_') + '_' + second),
  joinTableColumnName: (tableName: string, propertyName: string, columnName?: string) => snakeCase(tableName + '_' + (columnName ? columnName : propertyName)),
  joinTableInverseColumnName: (tableName: string, propertyName: string, columnName?: string) => snakeCase(tableName + '_' + (columnName ? columnName : propertyName)),
});

export function namingRules(name: 'default' | 'snake'): NamingRules {
  return name === 'snake' ? SNAKE_NAMING : DEFAULT_NAMING;
}
