// Errors in the shape Stripe's API answers with, so the SDK maps them to its own error classes
// (400/404 → StripeInvalidRequestError, 401 → StripeAuthenticationError, 402 → StripeCardError).

export type ApiErrorType = "invalid_request_error" | "idempotency_error" | "api_error" | "card_error";

export interface ApiErrorBody {
  error: {
    type: ApiErrorType;
    message: string;
    code?: string;
    param?: string;
    doc_url?: string;
  };
}

export class ApiError extends Error {
  readonly status: number;
  readonly body: ApiErrorBody;

  constructor(status: number, type: ApiErrorType, message: string, extra: { code?: string; param?: string } = {}) {
    super(message);
    this.status = status;
    this.body = { error: { type, message, ...extra } };
  }
}

export function invalidParam(param: string, message: string, code = "parameter_invalid"): ApiError {
  return new ApiError(400, "invalid_request_error", message, { code, param });
}

export function missingParam(param: string): ApiError {
  return new ApiError(400, "invalid_request_error", `Missing required param: ${param}.`, {
    code: "parameter_missing",
    param,
  });
}

export function noSuch(kind: string, id: string, param: string): ApiError {
  return new ApiError(404, "invalid_request_error", `No such ${kind}: '${id}'`, {
    code: "resource_missing",
    param,
  });
}
