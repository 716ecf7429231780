import type { DemoColumn, DemoRelation, DemoStep, DemoStory, DemoTable } from '../adapter/api.js';

/**
 * The demo story: two simulated years of the schema of a neighbourhood tool-lending
 * cooperative (members, tools, loans, reservations, repairs...). Invented data, ORM-neutral;
 * each adapter writes it in its own ORM's code. Every kind of event the analysis measures
 * happens at least once: tables born later, columns added and removed, a type change, a
 * primary-key change, foreign keys added and removed, a dropped table, an implicit
 * many-to-many relation, self-references, an enum whose values change, a formatting-only
 * commit, a class renamed while its table name stays, and one commit that does not parse.
 */

const id = (): DemoColumn => ({ name: 'id', field: 'id', type: 'serial' });
const col = (name: string, type: DemoColumn['type'], extra: Partial<DemoColumn> = {}): DemoColumn => ({
  name,
  field: name.replace(/_([a-z])/g, (_, c: string) => c.toUpperCase()),
  type,
  ...extra,
});
const rel = (field: string, column: string, references: string, backField: string, onDelete?: DemoRelation['onDelete']): DemoRelation => ({
  field, columns: [column], references, backField, ...(onDelete ? { onDelete } : {}),
});
const table = (model: string, tableName: string, columns: DemoColumn[], relations: DemoRelation[] = []): DemoTable => ({
  model, table: tableName, columns, primaryKey: ['id'], relations, manyToMany: [],
});

type Schema = { tables: DemoTable[]; enums: DemoStep['enums'] };
type Edit = (s: Schema) => void;

const find = (s: Schema, model: string): DemoTable => {
  const t = s.tables.find((x) => x.model === model);
  if (!t) throw new Error(`story: no model ${model}`);
  return t;
};
const addColumn = (model: string, c: DemoColumn, after?: string): Edit => (s) => {
  const t = find(s, model);
  const at = after ? t.columns.findIndex((x) => x.name === after) + 1 : t.columns.length;
  t.columns.splice(at, 0, c);
};
const dropColumn = (model: string, name: string): Edit => (s) => {
  const t = find(s, model);
  t.columns = t.columns.filter((c) => c.name !== name);
  t.relations = t.relations.filter((r) => !r.columns.includes(name));
};
const changeColumn = (model: string, name: string, patch: Partial<DemoColumn>): Edit => (s) => {
  const c = find(s, model).columns.find((x) => x.name === name)!;
  Object.assign(c, patch);
};
const addRelation = (model: string, r: DemoRelation): Edit => (s) => {
  find(s, model).relations.push(r);
};
const addTable = (t: DemoTable): Edit => (s) => {
  // a copy: later edits change the schema's tables, and the story is told afresh at every call
  s.tables.push(structuredClone(t));
};
const dropTable = (model: string): Edit => (s) => {
  s.tables = s.tables.filter((t) => t.model !== model);
};

/** Dates: one commit every few weeks over 2023 and 2024, at varying times of day (UTC). */
const steps: Array<{ date: string; message: string; edits: Edit[]; variant?: DemoStep['variant'] }> = [
  {
    date: '2023-01-09T18:20:00+01:00', message: 'Start the lending register: members and tools',
    edits: [
      addTable(table('Member', 'members', [id(), col('full_name', 'string', { length: 120 }), col('email', 'string', { length: 200 }), col('joined_on', 'date')])),
      addTable(table('Tool', 'tools', [id(), col('name', 'string', { length: 80 }), col('category', 'string', { length: 40 }), col('added_at', 'datetime', { default: 'now' })])),
    ],
  },
  {
    date: '2023-01-23T20:05:00+01:00', message: 'Record loans of tools to members',
    edits: [
      addTable(table('Loan', 'loans', [id(), col('member_id', 'int'), col('tool_id', 'int'), col('borrowed_at', 'datetime', { default: 'now' }), col('due_at', 'datetime')], [
        rel('member', 'member_id', 'Member', 'loans'), rel('tool', 'tool_id', 'Tool', 'loans'),
      ])),
    ],
  },
  { date: '2023-02-06T09:40:00+01:00', message: 'Tidy the schema layout', edits: [], variant: 'reformat' },
  { date: '2023-02-20T19:12:00+01:00', message: 'Members may leave a phone number', edits: [addColumn('Member', col('phone', 'string', { length: 30, nullable: true }))] },
  {
    date: '2023-03-13T21:30:00+01:00', message: 'Categories become a table of their own',
    edits: [
      addTable(table('Category', 'categories', [id(), col('label', 'string', { length: 60, unique: true })])),
      dropColumn('Tool', 'category'),
      addColumn('Tool', col('category_id', 'int', { nullable: true })),
      addRelation('Tool', rel('category', 'category_id', 'Category', 'tools', 'set null')),
    ],
  },
  {
    date: '2023-04-03T18:45:00+02:00', message: 'Members can reserve a tool ahead',
    edits: [
      addTable(table('Reservation', 'reservations', [id(), col('member_id', 'int'), col('tool_id', 'int'), col('starts_on', 'date'), col('ends_on', 'date')], [
        rel('member', 'member_id', 'Member', 'reservations'), rel('tool', 'tool_id', 'Tool', 'reservations'),
      ])),
    ],
  },
  { date: '2023-04-24T20:10:00+02:00', message: 'Note when a loan comes back', edits: [addColumn('Loan', col('returned_at', 'datetime', { nullable: true }))] },
  {
    date: '2023-05-15T17:55:00+02:00', message: 'Track repairs of broken tools',
    edits: [
      addTable(table('Repair', 'repairs', [id(), col('tool_id', 'int'), col('description', 'text'), col('cost', 'decimal', { precision: 8, scale: 2 }), col('reported_at', 'datetime', { default: 'now' })], [
        rel('tool', 'tool_id', 'Tool', 'repairs', 'cascade'),
      ])),
    ],
  },
  { date: '2023-06-05T19:25:00+02:00', message: 'Repair costs need more digits', edits: [changeColumn('Repair', 'cost', { precision: 10, scale: 2 })] },
  {
    date: '2023-06-26T21:00:00+02:00', message: 'Tag tools so that members find them',
    edits: [
      addTable(table('Tag', 'tags', [id(), col('word', 'string', { length: 40, unique: true })])),
      (s) => find(s, 'Tool').manyToMany.push({ with: 'Tag', field: 'tags', backField: 'tools' }),
    ],
  },
  {
    date: '2023-07-17T18:30:00+02:00', message: 'A member can be sponsored by another member',
    edits: [addColumn('Member', col('sponsor_id', 'int', { nullable: true })), addRelation('Member', rel('sponsor', 'sponsor_id', 'Member', 'sponsored', 'set null'))],
  },
  {
    date: '2023-08-07T10:15:00+02:00', message: 'Tools are kept in workshops',
    edits: [
      addTable(table('Workshop', 'workshops', [id(), col('name', 'string', { length: 80 }), col('address', 'text')])),
      addColumn('Tool', col('workshop_id', 'int', { nullable: true })),
      addRelation('Tool', rel('workshop', 'workshop_id', 'Workshop', 'tools', 'set null')),
    ],
  },
  { date: '2023-08-28T22:40:00+02:00', message: 'Start late fees (work in progress)', edits: [], variant: 'broken' },
  {
    date: '2023-09-04T19:05:00+02:00', message: 'Late fees on overdue loans',
    edits: [
      addTable(table('Fee', 'fees', [id(), col('loan_id', 'int'), col('amount', 'decimal', { precision: 8, scale: 2 }), col('paid_at', 'datetime', { nullable: true })], [
        rel('loan', 'loan_id', 'Loan', 'fees'),
      ])),
    ],
  },
  { date: '2023-09-25T20:20:00+02:00', message: 'One account per e-mail address', edits: [changeColumn('Member', 'email', { unique: true })] },
  {
    date: '2023-10-16T18:00:00+02:00', message: 'Membership plans',
    edits: [
      addTable(table('Plan', 'plans', [id(), col('title', 'string', { length: 60 }), col('yearly_fee', 'decimal', { precision: 8, scale: 2 })])),
      addColumn('Member', col('plan_id', 'int', { nullable: true })),
      addRelation('Member', rel('plan', 'plan_id', 'Plan', 'members', 'set null')),
    ],
  },
  {
    date: '2023-11-06T19:45:00+01:00', message: 'A reservation is identified by its tool and first day',
    edits: [
      dropColumn('Reservation', 'id'),
      (s) => {
        find(s, 'Reservation').primaryKey = ['tool_id', 'starts_on'];
      },
    ],
  },
  {
    date: '2023-11-27T20:30:00+01:00', message: 'Tool condition on the shelf',
    edits: [
      (s) => s.enums.push({ name: 'ToolCondition', values: ['GOOD', 'WORN', 'BROKEN'] }),
      addColumn('Tool', col('condition', 'enum', { enum: 'ToolCondition', default: 'GOOD' })),
    ],
  },
  { date: '2023-12-18T17:10:00+01:00', message: 'Workshops are gone: tools stay at members\' homes', edits: [dropColumn('Tool', 'workshop_id')] },
  { date: '2024-01-15T18:50:00+01:00', message: 'Remove the workshop register', edits: [dropTable('Workshop')] },
  {
    date: '2024-02-05T20:00:00+01:00', message: 'Volunteers who repair tools',
    edits: [
      addTable(table('Volunteer', 'volunteers', [id(), col('member_id', 'int', { unique: true }), col('skills', 'text')], [
        rel('member', 'member_id', 'Member', 'volunteering', 'cascade'),
      ])),
    ],
  },
  {
    date: '2024-02-26T19:35:00+01:00', message: 'Repairs are done by a volunteer',
    edits: [addColumn('Repair', col('volunteer_id', 'int', { nullable: true })), addRelation('Repair', rel('volunteer', 'volunteer_id', 'Volunteer', 'repairs', 'set null'))],
  },
  { date: '2024-03-18T21:15:00+01:00', message: 'A tool can wait for repair', edits: [(s) => { s.enums.find((e) => e.name === 'ToolCondition')!.values.push('AWAITING_REPAIR'); }] },
  { date: '2024-04-08T18:05:00+02:00', message: 'Notices on the co-op board', edits: [addTable(table('Notice', 'notices', [id(), col('title', 'string', { length: 120 }), col('body', 'text'), col('posted_at', 'datetime', { default: 'now' })]))] },
  { date: '2024-04-29T19:40:00+02:00', message: 'Longer tool names', edits: [changeColumn('Tool', 'name', { length: 160 })] },
  { date: '2024-05-20T20:25:00+02:00', message: 'Phone numbers are no longer kept', edits: [dropColumn('Member', 'phone')] },
  {
    date: '2024-06-10T18:15:00+02:00', message: 'Waiting list for popular tools',
    edits: [
      addTable(table('WaitlistEntry', 'waitlist_entries', [id(), col('member_id', 'int'), col('tool_id', 'int'), col('added_at', 'datetime', { default: 'now' })], [
        rel('member', 'member_id', 'Member', 'waitlist'), rel('tool', 'tool_id', 'Tool', 'waitlist'),
      ])),
    ],
  },
  { date: '2024-07-01T17:30:00+02:00', message: 'Reservations may carry a note', edits: [addColumn('Reservation', col('note', 'text', { nullable: true }))] },
  {
    date: '2024-08-12T19:00:00+02:00', message: 'Categories nest inside categories',
    edits: [addColumn('Category', col('parent_id', 'int', { nullable: true })), addRelation('Category', rel('parent', 'parent_id', 'Category', 'children', 'set null'))],
  },
  {
    date: '2024-09-02T20:45:00+02:00', message: 'Fees go when their loan goes',
    edits: [(s) => { find(s, 'Fee').relations[0]!.onDelete = 'cascade'; }],
  },
  { date: '2024-09-23T18:35:00+02:00', message: 'Keep a log of admin actions', edits: [addTable(table('AuditEntry', 'audit_entries', [id(), col('action', 'string', { length: 60 }), col('details', 'text', { nullable: true }), col('logged_at', 'datetime', { default: 'now' })]))] },
  { date: '2024-10-14T19:20:00+02:00', message: 'Count loan extensions', edits: [addColumn('Loan', col('extensions', 'int', { default: 0 }))] },
  { date: '2024-11-04T18:10:00+01:00', message: 'Rename the Notice model to Announcement (same table)', edits: [(s) => { find(s, 'Notice').model = 'Announcement'; }] },
  { date: '2024-11-25T20:55:00+01:00', message: 'Tags get a colour', edits: [addColumn('Tag', col('colour', 'string', { length: 7, nullable: true }))] },
  {
    date: '2024-12-16T19:30:00+01:00', message: 'Members can mark tools as favourites',
    edits: [
      addTable(table('Favourite', 'favourites', [col('member_id', 'int'), col('tool_id', 'int'), col('marked_at', 'datetime', { default: 'now' })], [
        rel('member', 'member_id', 'Member', 'favourites', 'cascade'), rel('tool', 'tool_id', 'Tool', 'favourites', 'cascade'),
      ])),
      (s) => { find(s, 'Favourite').primaryKey = ['member_id', 'tool_id']; },
    ],
  },
];

/** The story, each step holding the whole schema as it stands after that step. */
export function demoStory(): DemoStory {
  const schema: Schema = { tables: [], enums: [] };
  const out: DemoStep[] = [];
  for (const st of steps) {
    for (const e of st.edits) e(schema);
    const copy = structuredClone(schema);
    out.push({ date: st.date, message: st.message, tables: copy.tables, enums: copy.enums, ...(st.variant ? { variant: st.variant } : {}) });
  }
  return { title: 'Neighbourhood tool-lending cooperative', steps: out };
}
