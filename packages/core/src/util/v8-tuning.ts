import { setFlagsFromString } from 'node:v8';

/**
 * V8 settings for a process that runs the tool: the CLI (`runAsProcess`) and a study's pool
 * children set them at their start. The library does not set them by itself (they hold for the
 * whole process); a program that embeds the extraction may call `tuneV8()` first.
 *
 * `--interrupt-budget`: how much bytecode a function runs between two of V8's checks whether to
 * optimise it (V8's default 67,584, a value of V8 11.3, Node 20). A run of the tool calls a large
 * body of code (the engine, an adapter, the snapshot store, the diff) once per version, and with
 * the default budget V8 optimises much of it before the shapes of the objects it meets have
 * settled, then throws the code away and optimises it again (`--trace-opt`: 407 optimising
 * compilations in one Knex extract of 1,500 versions, fromInput 7 times). A larger budget
 * optimises later, with more feedback, and less often. See DEVELOPERS.md (Performance) for the
 * measurements behind the value.
 */
export const V8_FLAGS: readonly string[] = ['--interrupt-budget=270336'];

let tuned = false;

/** Apply `V8_FLAGS` to this process (once). */
export function tuneV8(): void {
  if (tuned) return;
  tuned = true;
  for (const flag of V8_FLAGS) setFlagsFromString(flag);
}
