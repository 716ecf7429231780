import type { DemoCommitFiles, DemoStep, DemoStory } from '@schema-strata/core';

export function renderKnexStep(_prev: DemoStep | null, _step: DemoStep): string {
  return '';
}
export function renderKnexDemo(_story: DemoStory): DemoCommitFiles[] {
  return [];
}
