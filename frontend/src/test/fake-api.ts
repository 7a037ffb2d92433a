import {
  AxiosError,
  AxiosHeaders,
  type AxiosAdapter,
  type InternalAxiosRequestConfig,
} from 'axios';
import { apiClient } from '../lib/api-client';

export interface FakeReply {
  status: number;
  data?: unknown;
}

export type FakeHandler = (request: {
  body: unknown;
  headers: AxiosHeaders;
}) => FakeReply | Promise<FakeReply>;

export interface RecordedRequest {
  method: string;
  url: string;
  body: unknown;
  /** The query parameters, as the client passed them. */
  params?: Record<string, unknown>;
  authorization: string | undefined;
}

/**
 * Replaces the HTTP layer under the real api-client (interceptors included) with handlers keyed
 * by `METHOD /path`, e.g. `'POST /auth/login'`. Unknown routes answer 404 like the server.
 */
export function installFakeApi(handlers: Record<string, FakeHandler>) {
  const requests: RecordedRequest[] = [];
  const original = apiClient.defaults.adapter;

  const adapter: AxiosAdapter = async (config: InternalAxiosRequestConfig) => {
    const method = (config.method ?? 'get').toUpperCase();
    const url = config.url ?? '';
    const headers = AxiosHeaders.from(config.headers);
    const body: unknown = typeof config.data === 'string' ? JSON.parse(config.data) : config.data;
    const authorization = headers.get('Authorization');
    requests.push({
      method,
      url,
      body,
      params: config.params as Record<string, unknown> | undefined,
      authorization: typeof authorization === 'string' ? authorization : undefined,
    });

    const handler = handlers[`${method} ${url}`];
    const reply = handler
      ? await handler({ body, headers })
      : {
          status: 404,
          data: { statusCode: 404, message: `Cannot ${method} ${url}`, error: 'Not Found' },
        };
    const response = {
      data: reply.data,
      status: reply.status,
      statusText: String(reply.status),
      headers: {},
      config,
      request: {},
    };
    if (reply.status >= 200 && reply.status < 300) return response;
    throw new AxiosError(
      `Request failed with status code ${reply.status}`,
      reply.status >= 500 ? AxiosError.ERR_BAD_RESPONSE : AxiosError.ERR_BAD_REQUEST,
      config,
      {},
      response,
    );
  };

  apiClient.defaults.adapter = adapter;
  return {
    requests,
    restore: () => {
      apiClient.defaults.adapter = original;
    },
  };
}
