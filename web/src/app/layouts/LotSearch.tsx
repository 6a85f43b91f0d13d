import { useEffect, useId, useState, type KeyboardEvent } from 'react';
import { useNavigate } from 'react-router-dom';
import { useLotSearch } from '@web/lib/lot-search';
import { lotPath } from '@web/lib/lots';
import { errorMessage } from '@web/lib/http';
import { PlantTime } from '@web/components/PlantTime';
import { cx } from '@web/components/ui/cx';

// Lets a person reach any lot's page from every screen: type its number or the start of it, pick it
// from the suggestions (or press Enter on a number typed in full) and the lot page opens.

/** The header's lot search: a combobox over GET /api/v1/lots?q=…, at most LOT_SUGGESTIONS suggestions. */
export function LotSearch({ className }: { className?: string }) {
  const navigate = useNavigate();
  const listId = useId();
  const [text, setText] = useState('');
  // The search waits for a pause in the typing, so a quick typist sends one request, not one a letter.
  const [typed, setTyped] = useState('');
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(-1);
  useEffect(() => {
    const pause = setTimeout(() => setTyped(text.trim()), 150);
    return () => clearTimeout(pause);
  }, [text]);
  const search = useLotSearch(typed);
  const wanted = text.trim();
  const lots = wanted && search.data ? search.data : [];
  // The answer is for what stands in the box, not for a few letters before.
  const answered = typed === wanted && search.isSuccess && !search.isPlaceholderData;

  const openLot = (lotNumber: string) => {
    setText('');
    setOpen(false);
    setActive(-1);
    navigate(lotPath(lotNumber));
  };

  const onKeyDown = (event: KeyboardEvent<HTMLInputElement>) => {
    if (event.key === 'ArrowDown' && lots.length) {
      event.preventDefault();
      setOpen(true);
      setActive((i) => Math.min(i + 1, lots.length - 1));
    } else if (event.key === 'ArrowUp' && lots.length) {
      event.preventDefault();
      setActive((i) => Math.max(i - 1, 0));
    } else if (event.key === 'Escape') {
      setOpen(false);
      setActive(-1);
    }
  };

  const onSubmit = () => {
    const chosen = lots[active] ?? lots.find((lot) => lot.lotNumber.toLowerCase() === wanted.toLowerCase()) ?? (answered && lots.length === 1 ? lots[0] : undefined);
    if (chosen) openLot(chosen.lotNumber);
    else setOpen(true);
  };

  const showList = open && wanted !== '';
  return (
    <form
      role="search"
      aria-label="Lots"
      className={cx('relative', className)}
      onSubmit={(event) => {
        event.preventDefault();
        onSubmit();
      }}
    >
      <label htmlFor={`${listId}-input`} className="sr-only">
        Find a lot
      </label>
      <input
        id={`${listId}-input`}
        type="search"
        role="combobox"
        aria-expanded={showList && lots.length > 0}
        aria-controls={listId}
        aria-autocomplete="list"
        aria-activedescendant={showList && active >= 0 ? `${listId}-${active}` : undefined}
        autoComplete="off"
        spellCheck={false}
        maxLength={64}
        placeholder="Find a lot…"
        value={text}
        onChange={(event) => {
          setText(event.target.value);
          setOpen(true);
          setActive(-1);
        }}
        onFocus={() => setOpen(true)}
        onBlur={() => setOpen(false)}
        onKeyDown={onKeyDown}
        className="block h-10 w-full rounded-md border border-zinc-300 bg-white px-3 font-mono text-base text-zinc-900 shadow-xs placeholder:font-sans placeholder:text-zinc-400 focus:outline-2 focus:outline-accent-500"
      />
      {showList && (
        <div className="absolute right-0 left-0 z-30 mt-1 min-w-64 rounded-md border border-zinc-200 bg-white shadow-lg">
          <ul id={listId} role="listbox" aria-label="Lots found" className="max-h-80 overflow-y-auto py-1">
            {lots.map((lot, i) => (
              <li
                key={lot.id}
                id={`${listId}-${i}`}
                role="option"
                aria-selected={i === active}
                // Keeps the focus in the box, so the list is still there when the click lands.
                onMouseDown={(event) => event.preventDefault()}
                onClick={() => openLot(lot.lotNumber)}
                className={cx('cursor-pointer px-3 py-2', i === active ? 'bg-accent-50' : 'hover:bg-zinc-100')}
              >
                <span className="block font-mono text-zinc-900">{lot.lotNumber}</span>
                <span className="block text-sm text-zinc-600">
                  {lot.productCode} · line {lot.lineCode} · <PlantTime at={lot.producedAt} />
                </span>
              </li>
            ))}
          </ul>
          {lots.length === 0 && (
            <p role="status" className="px-3 py-2 text-sm text-zinc-700">
              {search.isError ? `Could not search the lots: ${errorMessage(search.error)}` : answered ? `No lot called “${wanted}”.` : 'Searching…'}
            </p>
          )}
        </div>
      )}
    </form>
  );
}
