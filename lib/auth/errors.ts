/** The guards' refusals live with the app's one error hierarchy. */
export { AppError, forbidden, notFound, notSignedIn, rateLimited } from "@/lib/errors";
