import { useId, useState } from 'react';
import { countOf } from '../../../../shared/plural';
import { reviewsToPass } from '../../../../shared/scoring';
import type { ItemDetail } from '../../../../shared/schemas/standings.schema';

/** DESIGN §4.7: new reviews at a chosen star value, holding m and C, that lift the item above the next. */
export function WhatItTakes({ current }: { current: NonNullable<ItemDetail['current']> }) {
  const [stars, setStars] = useState(String(current.whatItTakesStars));
  const id = useId();
  const v = Number(stars);
  const valid = Number.isFinite(v) && v >= 1 && v <= 5;
  const above = current.above;
  let answer: string;
  if (!above) answer = 'This item leads the smoothed ordering: there is no item above it to pass.';
  else if (!valid) answer = 'Enter a star value between 1 and 5.';
  else {
    const k = reviewsToPass(current.m, current.C, current.n, current.sumStars, above.smoothed, v);
    answer =
      k === null
        ? `No number of ${v}-star reviews is enough: ${v} is not above ${above.sku}'s smoothed score of ${above.smoothed.toFixed(3)}.`
        : `${countOf(k, `new ${v}-star review`)} would lift it above ${above.sku} (smoothed ${above.smoothed.toFixed(3)}).`;
  }
  return (
    <div>
      <label htmlFor={id} className="text-sm font-semibold text-ink-800">
        Star value of the new reviews
      </label>
      <div className="mt-1 flex items-center gap-3">
        <input
          id={id}
          type="number"
          min={1}
          max={5}
          step={0.5}
          value={stars}
          onChange={(e) => setStars(e.target.value)}
          className="w-20 rounded-md border border-ink-200 bg-white px-2 py-1.5 font-mono"
        />
        <span className="text-xs text-ink-500">
          holding m = {current.m.toFixed(1)} and C = {current.C.toFixed(3)}
        </span>
      </div>
      <p className="mt-3 text-sm text-ink-900" aria-live="polite" data-testid="what-it-takes">
        {answer}
      </p>
      {above ? (
        <p className="mt-1 text-xs text-ink-500">
          Next above: {above.title ?? above.sku} <span className="font-mono">({above.sku})</span>
        </p>
      ) : null}
    </div>
  );
}
