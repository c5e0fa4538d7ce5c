/** The one error type of the server. Services throw it; the error middleware maps it. */
export class AppError extends Error {
  constructor(
    public readonly code: string,
    message: string,
    public readonly status: number = 400,
    public readonly fields?: Record<string, string>,
    public readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = "AppError";
  }
}

export const notFound = (what = "That") => new AppError("not_found", `${what} was not found.`, 404);
export const forbidden = (message = "Your role may not do this.") => new AppError("forbidden", message, 403);
export const unauthenticated = () => new AppError("unauthenticated", "Sign in first.", 401);
