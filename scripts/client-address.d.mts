import type { IPv4, IPv6 } from "ipaddr.js";
export declare const CLIENT_HEADER: string;
export type TrustedRange = [IPv4 | IPv6, number];
export declare function parseTrustedProxies(raw: string | undefined): TrustedRange[];
export declare function clientAddress(
  socketAddress: string | undefined,
  forwardedFor: string | string[] | undefined,
  ranges: TrustedRange[],
): string;
