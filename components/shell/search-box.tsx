"use client";
import { useRouter } from "next/navigation";
import { useEffect, useId, useRef, useState } from "react";
import useSWR from "swr";
import { cx } from "@/components/ui/cx";
import { kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import type { FoundBy, SearchAnswer, SearchHit } from "@/lib/search/search";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";

const fetcher = async (url: string): Promise<SearchAnswer> => {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) throw new Error((await res.json().catch(() => null))?.error ?? "Search failed.");
  return res.json();
};

const searchUrl = (q: string) => `/api/v1/search?q=${encodeURIComponent(q)}`;


const FOUND_BY: Record<FoundBy, string> = { maker_serial: "maker's serial", log_reference: "log reference", tracking: "tracking number" };

/** Each hit says what kind of thing it is, in the shop's words. */
function describe(hit: SearchHit): { title: string; detail: string; mono: boolean } {
  switch (hit.type) {
    case "item": {
      const via = hit.via ? ` · ${FOUND_BY[hit.via.by]} ${hit.via.text}` : "";
      return { title: hit.identity, detail: `${kindLabel(hit.kind)} · ${stateLabel(hit.state)}${via}`, mono: true };
    }
    case "dealer":
      return { title: hit.name, detail: `Dealer · ${hit.detail}`, mono: false };
    case "owner":
      return { title: hit.name, detail: `Owner · ${hit.detail}`, mono: false };
    case "case":
      return { title: hit.code, detail: `Service case · ${hit.about} · ${CASE_STATE_WORDS[hit.state].toLowerCase()}`, mono: true };
    case "containment":
      return { title: hit.code, detail: `Containment · ${hit.about} · ${hit.open ? "open" : "closed"}`, mono: true };
  }
}

/**
 * One box for a scanner (which types the text and Enter) or a person. An exact serial opens its
 * page; a slipped check character offers the serials it could have been; anything else is fuzzy.
 */
export function SearchBox() {
  const router = useRouter();
  const listId = useId();
  const [text, setText] = useState("");
  const [query, setQuery] = useState("");
  const [active, setActive] = useState(0);
  const [open, setOpen] = useState(false);
  const input = useRef<HTMLInputElement>(null);

  // Typing waits for a pause before asking; Enter asks at once.
  useEffect(() => {
    const t = setTimeout(() => setQuery(text.trim()), 180);
    return () => clearTimeout(t);
  }, [text]);

  const { data, error, isLoading } = useSWR(query ? searchUrl(query) : null, fetcher, { keepPreviousData: true });
  const hits: { hit: SearchHit; group: string }[] = data
    ? [
        ...(data.exact ? [{ hit: data.exact, group: "Exact" }] : []),
        ...data.didYouMean.map((hit) => ({ hit, group: "Did you mean" })),
        ...data.fuzzy.map((hit) => ({ hit, group: "Close matches" })),
      ]
    : [];

  const go = (hit: SearchHit) => {
    setOpen(false);
    setText("");
    router.push(hit.href);
  };

  const onEnter = async () => {
    const q = text.trim();
    if (!q) return;
    if (open && hits[active] && query === q) return go(hits[active].hit);
    const answer = await fetcher(searchUrl(q)).catch(() => null);
    if (answer?.exact) return go(answer.exact);
    setQuery(q);
    setOpen(true);
    setActive(0);
  };

  return (
    <div className="relative w-full" role="search">
      <label htmlFor={`${listId}-input`} className="sr-only">
        Find a serial, lot, flitch, tracking number, case, containment, dealer or owner
      </label>
      <input
        ref={input}
        id={`${listId}-input`}
        data-testid="search-input"
        type="search"
        autoComplete="off"
        spellCheck={false}
        placeholder="Scan, or type a serial, code or name…"
        className="block min-h-12 w-full rounded-lg border border-line-strong bg-surface px-3 font-mono text-base"
        role="combobox"
        aria-expanded={open && hits.length > 0}
        aria-controls={`${listId}-list`}
        aria-activedescendant={open && hits[active] ? `${listId}-opt-${active}` : undefined}
        value={text}
        onChange={(e) => {
          setText(e.target.value);
          setOpen(true);
          setActive(0);
        }}
        onFocus={() => setOpen(true)}
        onBlur={() => setTimeout(() => setOpen(false), 150)}
        onKeyDown={(e) => {
          if (e.key === "ArrowDown") {
            e.preventDefault();
            setActive((a) => Math.min(a + 1, Math.max(hits.length - 1, 0)));
          } else if (e.key === "ArrowUp") {
            e.preventDefault();
            setActive((a) => Math.max(a - 1, 0));
          } else if (e.key === "Enter") {
            e.preventDefault();
            void onEnter();
          } else if (e.key === "Escape") {
            setOpen(false);
          }
        }}
      />
      {open && query ? (
        <div className="absolute left-0 right-0 top-full z-30 mt-1 rounded-lg border border-line bg-surface shadow-lg" data-testid="search-results">
          {error ? <p className="px-3 py-2 text-danger">{String(error.message)}</p> : null}
          {!error && !isLoading && data && hits.length === 0 ? <p className="px-3 py-2 text-ink-soft">Nothing found for “{data.query}”.</p> : null}
          <ul id={`${listId}-list`} role="listbox" aria-label="Search results" className="max-h-96 overflow-y-auto py-1">
            {hits.map(({ hit, group }, i) => {
              const d = describe(hit);
              const first = i === 0 || hits[i - 1]!.group !== group;
              return (
                <li key={`${group}-${hit.type}-${hit.id}`} role="presentation">
                  {first ? <p className="px-3 pt-2 text-xs font-bold uppercase tracking-wide text-ink-soft" aria-hidden="true">{group}</p> : null}
                  <div
                    id={`${listId}-opt-${i}`}
                    role="option"
                    aria-selected={i === active}
                    data-testid="search-option"
                    data-group={group}
                    onMouseDown={(e) => {
                      e.preventDefault();
                      go(hit);
                    }}
                    onMouseEnter={() => setActive(i)}
                    className={cx("flex min-h-12 cursor-pointer flex-col justify-center px-3 py-1", i === active && "bg-leaf-soft")}
                  >
                    <span className={cx("font-bold", d.mono && "serial")}>{d.title}</span>
                    <span className="text-sm text-ink-soft">{d.detail}</span>
                  </div>
                </li>
              );
            })}
          </ul>
        </div>
      ) : null}
    </div>
  );
}
