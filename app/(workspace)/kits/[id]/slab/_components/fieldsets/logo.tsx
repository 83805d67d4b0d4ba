"use client";

import { useId, useState } from "react";
import { useWatch } from "react-hook-form";
import { importSvgLogo, LogoError } from "@/lib/geometry/marks/logo";
import { Num, Pick, RELIEF, WHERE, type Form } from "../fields";

const FILE_INPUT = [
  "field-input mt-0.5 cursor-pointer px-1.5 py-1 text-xs text-muted",
  "file:mr-2 file:cursor-pointer file:rounded-card file:border file:border-solid file:border-hairline file:bg-paper",
  "file:px-2 file:py-0.5 file:text-xs file:font-bold file:text-ink hover:file:border-accent",
].join(" ");

/** A logo from an SVG drawing (its outlines), read in the browser; then its width, relief and place. */
export function LogoFieldset({ form }: { form: Form }) {
  const logo = useWatch({ control: form.control, name: "logo" });
  const id = useId();
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Logo</legend>
      <div className="text-xs text-muted">
        <label htmlFor={`${id}-file`}>SVG drawing (outlines only){logo ? ": choose another to replace it" : ""}</label>
        {logo ? (
          <span className="block text-ink" id={`${id}-now`}>
            Now: “{logo.name}”
          </span>
        ) : null}
        {/* The browser's own file control (keyboard and screen readers know it), dressed like our fields. */}
        <input
          id={`${id}-file`}
          type="file"
          accept=".svg,image/svg+xml"
          className={FILE_INPUT}
          aria-describedby={[problem ? `${id}-e` : "", logo ? `${id}-now` : ""].filter(Boolean).join(" ") || undefined}
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
