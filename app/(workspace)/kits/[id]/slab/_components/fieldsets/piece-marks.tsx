"use client";

import { useWatch } from "react-hook-form";
import { FACES, Num, Pick, type Form } from "../fields";

/** What marks each piece: its number beside it, and a ring or a pocket under it. */
export function PieceMarksFieldset({ form }: { form: Form }) {
  const [numbers, outlines] = useWatch({ control: form.control, name: ["numbers", "outlines"] });
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Piece marks</legend>
      <div className="grid grid-cols-2 items-end gap-2">
        <label className="flex items-center gap-2 pb-1.5 text-xs">
          <input type="checkbox" {...form.register("numbers")} /> numbers beside pieces
        </label>
        <Pick
          form={form}
          name="outlines"
          label="Outlines"
          aria="Piece outlines"
          options={[
            ["ring", "outline rings"],
            ["pocket", "pockets"],
            ["none", "no outlines"],
          ]}
        />
      </div>
      {numbers ? (
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="numberStyle.size" label="Number height" unit="mm" step={0.5} />
          <Pick form={form} name="numberStyle.font" label="Number face" options={FACES} />
          <Num form={form} name="numberStyle.depth" label="Number depth" unit="mm" step={0.1} />
        </div>
      ) : null}
      {outlines !== "none" ? (
        <div className="grid grid-cols-2 gap-2">
          {outlines === "ring" ? <Num form={form} name="ringStyle.width" label="Ring width" unit="mm" step={0.1} /> : null}
          <Num form={form} name="ringStyle.clearance" label="Clearance" unit="mm" step={0.1} />
          <Num form={form} name="ringStyle.depth" label={outlines === "ring" ? "Ring depth" : "Pocket depth"} unit="mm" step={0.1} />
        </div>
      ) : null}
    </fieldset>
  );
}
