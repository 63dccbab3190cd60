import { memo } from 'react';
import { useDraggable } from '@dnd-kit/core';
import type { BoardFerment } from '../../lib/board';
import { FORECAST_STATUS_LABELS } from '../../lib/vocabulary';

const STATUS_TAG: Record<string, string> = {
  finished: 'tag-settled',
  slowing: 'tag-working',
  active: 'tag-working',
  lag: 'tag-quiet',
  insufficient_data: 'tag-quiet',
  stalled: 'tag-stalled',
  souring: 'tag-souring',
};

export interface FermentChipProps {
  ferment: BoardFerment;
  unbookedText: string;
  whenText: string;
  canBook: boolean;
  onBook: (fermentId: number) => void;
}

function FermentChipInner(p: FermentChipProps) {
  const { attributes, listeners, setNodeRef, transform, isDragging } = useDraggable({
    id: `ferment:${p.ferment.id}`,
    data: { kind: 'ferment', fermentId: p.ferment.id },
    disabled: !p.canBook,
  });
  return (
    <li className={`ferment-chip${isDragging ? ' is-dragging' : ''}`} data-testid={`wash-${p.ferment.code}`}>
      <div
        ref={setNodeRef}
        className="ferment-handle"
        style={transform ? { transform: `translate3d(${transform.x}px, ${transform.y}px, 0)`, zIndex: 40, position: 'relative' } : undefined}
        {...attributes}
        {...listeners}
        aria-roledescription={p.canBook ? 'wash you can drag onto a still' : 'wash'}
        aria-label={`Wash ${p.ferment.code}, ${FORECAST_STATUS_LABELS[p.ferment.status]}, ${p.whenText}, ${p.unbookedText} not booked`}
      >
        <span className="font-bold">{p.ferment.code}</span>
        <span className={`tag ${STATUS_TAG[p.ferment.status] ?? 'tag-quiet'}`}>{FORECAST_STATUS_LABELS[p.ferment.status] ?? p.ferment.status}</span>
        <span className="block w-full text-xs text-ink-soft">
          {p.whenText} · {p.unbookedText} free
        </span>
      </div>
      {p.canBook && (
        <button type="button" className="btn-quiet chip-book" onClick={() => p.onBook(p.ferment.id)} aria-label={`Book wash ${p.ferment.code} on a still`}>
          Book
        </button>
      )}
    </li>
  );
}

export const FermentChip = memo(FermentChipInner);
