import type { ReactNode } from "react";
import { NarrowPage } from "../_components/narrow-page";

export default function AuthLayout({ children }: { children: ReactNode }) {
  return <NarrowPage centred>{children}</NarrowPage>;
}
