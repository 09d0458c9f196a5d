"use client";
// The limits editor's place tree: plant-wide defaults, then each hall, its lines and their points.
import clsx from "clsx";
import type { Place, PlantTree } from "./rules-in-force";

export function PlacePicker({ tree, place, plantPlace, onChoose }: { tree: PlantTree; place: Place; plantPlace: Place; onChoose: (p: Place) => void }) {
  return (
    <nav aria-label="Where" className="rounded-card border border-paper-line bg-paper-raised p-2 text-sm lg:max-h-[calc(100vh-9rem)] lg:overflow-y-auto">
      <PlaceButton active={place.level === "plant"} onClick={() => onChoose(plantPlace)} label="Plant-wide defaults" depth={0} />
      {tree.map((a) => (
        <div key={a.id}>
          <PlaceButton
            active={place.level === "area" && place.areaId === a.id}
            onClick={() => onChoose({ level: "area", areaId: a.id, lineId: null, pointId: null, label: a.name })}
            label={a.name}
            depth={0}
            strong
          />
          {a.lines.map((l) => (
            <div key={l.id}>
              <PlaceButton
                active={place.level === "line" && place.lineId === l.id}
                onClick={() => onChoose({ level: "line", areaId: a.id, lineId: l.id, pointId: null, label: `${a.name} › ${l.name}` })}
                label={l.name}
                depth={1}
              />
              {l.points.map((p) => (
                <PlaceButton
                  key={p.id}
                  active={place.level === "point" && place.pointId === p.id}
                  onClick={() => onChoose({ level: "point", areaId: a.id, lineId: l.id, pointId: p.id, label: `${a.name} › ${l.name} › ${p.name}` })}
                  label={p.name}
                  depth={2}
                />
              ))}
            </div>
          ))}
        </div>
      ))}
    </nav>
  );
}

function PlaceButton({ active, onClick, label, depth, strong }: { active: boolean; onClick: () => void; label: string; depth: number; strong?: boolean }) {
  return (
    <button
      type="button"
      onClick={onClick}
      aria-current={active ? "true" : undefined}
      className={clsx(
        "block w-full truncate rounded px-2 py-1 text-left",
        active ? "bg-brand text-white" : "text-ink-soft hover:bg-paper-sunk hover:text-ink",
        strong && !active && "font-medium text-ink",
      )}
      style={{ paddingLeft: `${0.5 + depth * 0.9}rem` }}
    >
      {label}
    </button>
  );
}
