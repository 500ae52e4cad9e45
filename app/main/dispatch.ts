/**
 * One call of the API by channel name, shared by the Electron main process (IPC) and the local web mode
 * (HTTP): validate the argument (./validate.ts), then call the same service method. A refused argument
 * becomes an ApiProblem of kind "invalid-request". Pure: no Electron, no Node built-ins.
 */
import type { ApiChannel, ApiReply, ShadowfrontApi } from '../shared/contract.ts';
import { checkArgument, isApiChannel } from './validate.ts';

/** Channels whose argument is an optional object: a missing one counts as {}. */
const OPTIONAL_OBJECT: ReadonlySet<ApiChannel> = new Set<ApiChannel>(['setup.listPresets', 'logbook.measurements', 'logbook.exportCsv']);

export function invalidRequestReply(channel: string, detail: string): ApiReply<never> {
  return { ok: false, problem: { kind: 'invalid-request', message: `The request "${channel}" was refused: ${detail}.` } };
}

export async function callChannel(service: ShadowfrontApi, channel: string, arg: unknown): Promise<ApiReply<unknown>> {
  if (!isApiChannel(channel)) return invalidRequestReply(String(channel).slice(0, 100), 'there is no such call');
  const problem = checkArgument(channel, arg);
  if (problem) return invalidRequestReply(channel, problem);
  const value = arg === null || arg === undefined ? (OPTIONAL_OBJECT.has(channel) ? {} : undefined) : arg;
  const [group, method] = channel.split('.') as [keyof ShadowfrontApi, string];
  const fn = (service[group] as unknown as Record<string, (a: unknown) => Promise<ApiReply<unknown>>>)[method];
  return fn(value);
}
