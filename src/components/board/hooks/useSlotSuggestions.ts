/** The earliest free slots the server suggests for a run at risk, and moving the run to one. */
import { useState } from 'react';
import type { BoardRun, MoveTarget } from '../../../lib/board';
import { api } from '../api';

export interface SlotSuggestions {
  loading: boolean;
  notBefore?: string;
  slots: Array<{ stillId: number; startsAt: Date; endsAt: Date }>;
  error?: string;
}

export function useSlotSuggestions(saveMove: (run: BoardRun, target: MoveTarget) => Promise<void>) {
  const [suggestions, setSuggestions] = useState<Record<number, SlotSuggestions>>({});

  const findSlots = async (runId: number) => {
    setSuggestions((s) => ({ ...s, [runId]: { loading: true, slots: [] } }));
    const res = await api.suggestions(runId);
    setSuggestions((s) => ({
      ...s,
      [runId]: res.ok
        ? {
            loading: false,
            notBefore: res.data.notBefore,
            slots: res.data.slots.map((x) => ({ stillId: x.stillId, startsAt: new Date(x.startsAt), endsAt: new Date(x.endsAt) })),
          }
        : { loading: false, slots: [], error: res.error.message },
    }));
  };

  const moveHere = async (run: BoardRun, slot: MoveTarget) => {
    setSuggestions((s) => {
      const n = { ...s };
      delete n[run.id];
      return n;
    });
    await saveMove(run, slot);
  };

  return { suggestions, findSlots, moveHere };
}
