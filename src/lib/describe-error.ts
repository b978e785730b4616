import { isApiRequestError } from "./api-error";

export type ErrorDescription = {
  title: string;
  message: string;
  /** Whether trying the same request again may help. */
  retryable: boolean;
  /** The session ended: the person must sign in again. */
  signedOut: boolean;
};

/** Turns any failure into words for the person in front of the screen. */
export function describeError(error: unknown): ErrorDescription {
  if (isApiRequestError(error)) {
    const base = { message: error.message, retryable: error.isRetryable, signedOut: false };
    switch (error.status) {
      case 0:
        return { ...base, title: "Cannot reach Sigmaflow" };
      case 401:
        return { ...base, title: "Your session has ended", signedOut: true };
      case 403:
        return { ...base, title: "You do not have access to this" };
      case 404:
        return { ...base, title: "Not found" };
      case 429:
        return { ...base, title: "Too many requests" };
      default:
        if (error.status >= 500) {
          return { ...base, title: "Sigmaflow's server had a problem", retryable: true };
        }
        return { ...base, title: "The request was not accepted" };
    }
  }
  return {
    title: "Something went wrong",
    message: error instanceof Error ? error.message : "An unexpected error occurred.",
    retryable: true,
    signedOut: false,
  };
}
