/**
 * Plans, kept as data: what each allows and what it costs. Our own names and numbers. Prices are in
 * the smallest currency unit (cents); `price` names the payment provider's price for checkout.
 */
import { amount } from "@/lib/format";

export type PlanId = "bench" | "workshop" | "farm";

export type Plan = {
  id: PlanId;
  name: string;
  tagline: string;
  monthlyCents: number;
  /** Plates a workspace may make in one billing period. */
  platesPerPeriod: number;
  /** API keys a workspace may hold (0: no API access). */
  apiKeys: number;
  logos: boolean;
  /** Queue priority of its builds: a farm's plates are built first when the workers are busy. */
  buildPriority: number;
  priceEnv?: "STRIPE_PRICE_WORKSHOP" | "STRIPE_PRICE_FARM";
};

export const PLANS: Record<PlanId, Plan> = {
  bench: {
    id: "bench",
    name: "Bench",
    tagline: "For trying Slabwright on your own kits",
    monthlyCents: 0,
    platesPerPeriod: 30,
    apiKeys: 0,
    logos: false,
    buildPriority: 0,
  },
  workshop: {
    id: "workshop",
    name: "Workshop",
    tagline: "For a shop selling kits: the order API and branded templates",
    monthlyCents: 1900,
    platesPerPeriod: 1500,
    apiKeys: 10,
    logos: true,
    buildPriority: 5,
    priceEnv: "STRIPE_PRICE_WORKSHOP",
  },
  farm: {
    id: "farm",
    name: "Farm",
    tagline: "For print farms: high volume, its builds first in the queue",
    monthlyCents: 7900,
    platesPerPeriod: 50000,
    apiKeys: 1000,
    logos: true,
    buildPriority: 10,
    priceEnv: "STRIPE_PRICE_FARM",
  },
};

export const PLAN_ORDER: PlanId[] = ["bench", "workshop", "farm"];

/** A plan's price in words: "free", or "€19.00 a month" (plans are priced in euro). */
export const money = (cents: number) => (cents === 0 ? "free" : `${amount(cents, "EUR")} a month`);
