import { readAssumptions, type AdapterOption, type AdapterOptionValues, type AssumedValue, type Diagnostic } from '@schema-strata/core/extract';

/** TypeORM's decorators the adapter interprets (and that `--typeorm-decorator` may name). */
export const TYPEORM_DECORATORS = [
  'Entity', 'ChildEntity', 'ViewEntity', 'TableInheritance', 'Tree',
  'Column', 'PrimaryColumn', 'PrimaryGeneratedColumn', 'CreateDateColumn', 'UpdateDateColumn', 'DeleteDateColumn',
  'VersionColumn', 'Generated', 'ObjectIdColumn', 'TreeLevelColumn', 'VirtualColumn', 'ViewColumn',
  'ManyToOne', 'OneToOne', 'OneToMany', 'ManyToMany', 'JoinColumn', 'JoinTable', 'TreeParent', 'TreeChildren',
  'RelationId', 'RelationCount', 'Index', 'Unique', 'Check', 'Exclusion', 'ForeignKey',
] as const;

/** TypeORM's class decorators that make a class an entity (or a view). */
export const ENTITY_DECORATORS: ReadonlySet<string> = new Set(['Entity', 'ChildEntity', 'ViewEntity']);

/** Options of the TypeORM adapter (shown by `schema-strata extract --help`). */
export const TYPEORM_OPTIONS: readonly AdapterOption[] = Object.freeze([
  {
    flag: 'typeorm-naming',
    description:
      'naming strategy: auto (as the data source options say: the snake-case strategy when they install one, else TypeORM\'s default), default, or snake',
    type: 'string',
    choices: ['auto', 'default', 'snake'],
    default: 'auto',
  },
  {
    flag: 'typeorm-decorator',
    description:
      "what a project's own decorator stands for, NAME=TYPEORM_DECORATOR (e.g. EntityId=Column); its arguments are passed as that decorator's; repeatable; IGNORE silences a decorator",
    type: 'string[]',
  },
  {
    flag: 'typeorm-assume',
    description:
      "NAME=VALUE: a value the entities or the data source read from something the project never declares (an environment variable: process.env.DB_TYPE=mysql, process.env.NODE_ENV=production), so that options computed from it (a column type chosen by a condition, the data source's type) are known; VALUE is a JSON number, true, false, null or a quoted string, else the text as it stands (always the text under process.env); repeat for several",
    type: 'string[]',
  },
  {
    flag: 'typeorm-database',
    description: 'database whose type rules apply: auto (the data source\'s `type`, else postgres), postgres, mysql, sqlite or mssql',
    type: 'string',
    choices: ['auto', 'postgres', 'mysql', 'sqlite', 'mssql'],
    default: 'auto',
  },
]);

export interface TypeormSettings {
  naming: 'auto' | 'default' | 'snake';
  database: 'auto' | 'postgres' | 'mysql' | 'sqlite' | 'mssql';
  /** Project decorator name -> TypeORM decorator name (or `IGNORE`). */
  decorators: Map<string, string>;
  /** Values of reads from undeclared names (`--typeorm-assume`), by dotted path. */
  assume: ReadonlyMap<string, AssumedValue>;
  diagnostics: Diagnostic[];
}

/** The adapter's options, read and checked (a malformed mapping is a diagnostic, not an abort). */
export function readSettings(options: AdapterOptionValues): TypeormSettings {
  const diagnostics: Diagnostic[] = [];
  const naming = options['typeorm-naming'];
  const database = options['typeorm-database'];
  const decorators = new Map<string, string>();
  const raw = options['typeorm-decorator'];
  const list = Array.isArray(raw) ? raw : typeof raw === 'string' ? [raw] : [];
  for (const entry of list) {
    const m = /^\s*@?([A-Za-z_$][\w$.]*)\s*=\s*@?([A-Za-z]+)\s*$/.exec(entry);
    const target = m ? (TYPEORM_DECORATORS as readonly string[]).find((d) => d.toLowerCase() === m[2]!.toLowerCase()) ?? (m[2]!.toUpperCase() === 'IGNORE' ? 'IGNORE' : undefined) : undefined;
    if (!m || !target) {
      diagnostics.push({
        severity: 'error', code: 'typeorm/bad-decorator-option',
        message: `--typeorm-decorator ${entry}: expected NAME=TYPEORM_DECORATOR with one of ${TYPEORM_DECORATORS.join(', ')} or IGNORE`,
      });
      continue;
    }
    decorators.set(m[1]!, target);
  }
  const assumed = readAssumptions(options['typeorm-assume'], 'typeorm-assume', 'typeorm/bad-assume-option');
  diagnostics.push(...assumed.diagnostics);
  return {
    naming: naming === 'default' || naming === 'snake' ? naming : 'auto',
    database: database === 'postgres' || database === 'mysql' || database === 'sqlite' || database === 'mssql' ? database : 'auto',
    decorators,
    assume: assumed.values,
    diagnostics,
  };
}
