"use client";

import { useId, useState } from "react";
import { useWatch } from "react-hook-form";
import { importSvgLogo, LogoError } from "@/lib/geometry/marks/logo";
import { Num, Pick, RELIEF, WHERE, type Form } from "../fields";

/** A logo from an SVG drawing (its outlines), read in the browser; then its width, relief and place. */
export function LogoFieldset({ form }: { form: Form }) {
  const logo = useWatch({ control: form.control, name: "logo" });
  const id = useId();
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Logo</legend>
      <div className="text-xs text-muted">
        <label htmlFor={`${id}-file`}>{logo ? `“${logo.name}” — replace with another SVG` : "SVG drawing (outlines only)"}</label>
        <input
          id={`${id}-file`}
          type="file"
          accept=".svg,image/svg+xml"
          className="mt-0.5 block w-full text-xs"
          aria-describedby={problem ? `${id}-e` : undefined}
          onChange={async (e) => {
            const file = e.target.files?.[0];
            e.target.value = "";
            if (!file) return;
            try {
              const parsed = importSvgLogo(new Uint8Array(await file.arrayBuffer()));
              setProblem(null);
              form.setValue(
                "logo",
                {
                  name: file.name.replace(/\.svg$/i, ""),
                  paths: parsed.paths,
                  box: parsed.box,
                  width: logo?.width ?? 20,
                  relief: logo?.relief ?? "engrave",
                  depth: logo?.depth ?? 0.4,
                  where: logo?.where ?? "auto",
                  x: 0,
                  y: 0,
                },
                { shouldDirty: true, shouldValidate: true },
              );
            } catch (err) {
              setProblem(err instanceof LogoError ? err.message : "The file could not be read as SVG.");
            }
          }}
        />
        {problem ? (
          <span id={`${id}-e`} role="alert" className="mt-0.5 block text-finding-error" data-testid="logo-error">
            {problem}
          </span>
        ) : null}
      </div>
      {logo ? (
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="logo.width" label="Logo width" unit="mm" step={1} />
          <Pick form={form} name="logo.relief" label="Relief" options={RELIEF} />
          <Num form={form} name="logo.depth" label={logo.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
          <Pick form={form} name="logo.where" label="Place" options={WHERE} />
          {logo.where === "at" ? (
            <>
              <Num form={form} name="logo.x" label="x" unit="mm" step={0.5} />
              <Num form={form} name="logo.y" label="y" unit="mm" step={0.5} />
            </>
          ) : null}
          <button
            type="button"
            className="btn-quiet col-span-2 px-2 py-1 text-xs"
            onClick={() => form.setValue("logo", null, { shouldDirty: true })}
          >
            Remove the logo
          </button>
        </div>
      ) : null}
    </fieldset>
  );
}
