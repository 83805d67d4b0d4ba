import { describe, expect, it } from "vitest";
import { editHistory, HISTORY_LIMIT, historyOf, movedPlacements, type History, type HistoryAction, type Layout } from "./layout-history";

const at = (x: number) => [{ piece: 1, x, y: 0, rotation: 0 }];
const EMPTY_HISTORY = historyOf<Layout>(undefined);
const run = (actions: HistoryAction<Layout>[], from: History<Layout> = EMPTY_HISTORY) => actions.reduce(editHistory<Layout>, from);

describe("layout history", () => {
  it("undo walks back to the automatic layout, redo forward again", () => {
    const h = run([
      { type: "step", state: at(1) },
      { type: "step", state: at(2) },
    ]);
    expect(h.present).toEqual(at(2));
    const back1 = editHistory(h, { type: "undo" });
    expect(back1.present).toEqual(at(1));
    const back2 = editHistory(back1, { type: "undo" });
    expect(back2.present).toBeUndefined();
    expect(back2.past).toEqual([]);
    expect(back2.future).toEqual([at(1), at(2)]);
    const fwd = editHistory(back2, { type: "redo" });
    expect(fwd.present).toEqual(at(1));
    expect(editHistory(fwd, { type: "redo" }).present).toEqual(at(2));
  });

  it("nothing to undo or redo changes nothing", () => {
    expect(editHistory(EMPTY_HISTORY, { type: "undo" })).toBe(EMPTY_HISTORY);
    expect(editHistory(EMPTY_HISTORY, { type: "redo" })).toBe(EMPTY_HISTORY);
  });

  it("a new move after an undo drops the undone moves", () => {
    const h = run([{ type: "step", state: at(1) }, { type: "step", state: at(2) }, { type: "undo" }, { type: "step", state: at(3) }]);
    expect(h.present).toEqual(at(3));
    expect(h.future).toEqual([]);
    expect(h.past).toEqual([undefined, at(1)]);
  });

  it("going back to automatic is a step that can be undone", () => {
    const h = run([
      { type: "step", state: at(1) },
      { type: "step", state: undefined },
    ]);
    expect(h.present).toBeUndefined();
    expect(editHistory(h, { type: "undo" }).present).toEqual(at(1));
  });

  it("replace sets the layout without a step and keeps the history", () => {
    const h = run([
      { type: "step", state: at(1) },
      { type: "replace", state: undefined },
    ]);
    expect(h.present).toBeUndefined();
    expect(h.past).toEqual([undefined]);
  });

  it(`keeps the last ${HISTORY_LIMIT} layouts`, () => {
    const h = run(Array.from({ length: HISTORY_LIMIT + 10 }, (_, i) => ({ type: "step", state: at(i) }) as const));
    expect(h.past).toHaveLength(HISTORY_LIMIT);
    expect(h.past[0]).toEqual(at(9)); // places 0…59 made; the oldest kept is the 10th layout from the start
    const undone = run(
      Array.from({ length: HISTORY_LIMIT + 5 }, () => ({ type: "undo" }) as const),
      h,
    );
    expect(undone.present).toEqual(at(9));
  });
});

describe("moved placements", () => {
  const pieces = [
    { number: 2, slot: 1, x: 10, y: 20, rotation: 0 },
    { number: 1, slot: 2, x: 40, y: 20, rotation: 90 },
  ];
  it("moves and turns only the piece in that slot (not the one with that number); every piece keeps its kit slot", () => {
    expect(movedPlacements(pieces, 2, 0.5, -5, 15)).toEqual([
      { piece: 1, x: 10, y: 20, rotation: 0 },
      { piece: 2, x: 40.5, y: 15, rotation: 105 },
    ]);
  });
  it("a move without a turn keeps the rotation", () => {
    expect(movedPlacements(pieces, 1, 3, 0)[0]).toEqual({ piece: 1, x: 13, y: 20, rotation: 0 });
  });
});
