import { createContext, useContext } from 'react';
import { NumberField } from '../fields';
import { getIn } from './draft';
import { nodeAt, numberBounds, titleOf, unitOfField, type Path } from './schemaForm';

export interface SpecNumberProps {
  /** The object the path starts from (the draft spec, or `{ law }` for a pair's second law). */
  draft: unknown;
  path: Path;
  onChange: (path: Path, v: number | undefined) => void;
  issues: Record<string, string>;
  /** This field's key in `issues` when it is not the dotted path (the pair's second law). */
  issueKey?: string;
  label?: string;
}

/** The person's own limits for spec fields (from their quota), by issue key: "your limit 2 000". */
export const QuotaLimitHints = createContext<Record<string, string>>({});

/** A number of the run spec with its unit, range and description taken from the shared schema. */
export function SpecNumber({ draft, path, onChange, issues, issueKey = path.join('.'), label }: SpecNumberProps) {
  const key = path[path.length - 1];
  const found = nodeAt(path, draft);
  const node = found?.node ?? {};
  const b = numberBounds(node);
  const value = getIn(draft, path);
  // A vector's components carry the vector's unit (read from its key).
  const unit = typeof key === 'number' ? unitOfField(path[path.length - 2], nodeAt(path.slice(0, -1), draft)?.node ?? {}) : unitOfField(key, node);
  const limit = useContext(QuotaLimitHints)[issueKey];
  return (
    <NumberField
      label={label ?? titleOf(key, node)}
      value={typeof value === 'number' ? value : undefined}
      onChange={(v) => onChange(path, v)}
      unit={unit}
      min={b.min}
      max={b.max}
      exclusiveMin={b.exclusiveMin}
      integer={b.integer}
      optional={Boolean(found?.optional)}
      hint={node.description}
      limit={limit}
      error={issues[issueKey]}
      testID={`field-${issueKey}`}
    />
  );
}
