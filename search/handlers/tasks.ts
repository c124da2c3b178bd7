/**
 * GET /tasks (statuses, types, indexUids, uids, batchUids, after/before dates, limit, from, reverse; newest first) and
 * GET /tasks/:uid.
 */
import { ApiError } from "../errors.ts";
import { intParam, listParam, send } from "../http.ts";
import type { Handler } from "../routes.ts";
import { TASK_STATUSES, TASK_TYPES, taskView, type TaskRecord, type TaskStatus } from "../tasks.ts";

export const getTasks: Handler = ({ res, params, state }) => send(res, 200, listTasks(state.tasks.tasks, params));

export const getTask: Handler = ({
  res,
  segs,
  state: {
    tasks: { taskByUid },
  },
}) => {
  const n = Number(segs[1]);
  if (!/^\d+$/.test(segs[1]) || !Number.isSafeInteger(n)) {
    throw new ApiError(400, "invalid_task_uids", `Invalid value in parameter \`taskUid\`: could not parse \`${segs[1]}\` as a positive integer`);
  }
  const t = taskByUid.get(n);
  if (!t) throw new ApiError(404, "task_not_found", `Task \`${n}\` not found.`);
  send(res, 200, taskView(t));
};

export function listTasks(tasks: TaskRecord[], params: URLSearchParams) {
  const statuses = listParam(params, "statuses");
  const types = listParam(params, "types");
  const indexUids = listParam(params, "indexUids");
  const uids = listParam(params, "uids");
  const batchUids = listParam(params, "batchUids");
  for (const s of statuses ?? []) {
    if (!TASK_STATUSES.includes(s as TaskStatus)) {
      throw new ApiError(
        400,
        "invalid_task_statuses",
        `Invalid value in parameter \`statuses\`: \`${s}\` is not a valid task status. Available statuses are ${TASK_STATUSES.map((x) => `\`${x}\``).join(", ")}.`,
      );
    }
  }
  for (const ty of types ?? []) {
    if (!TASK_TYPES.includes(ty)) {
      throw new ApiError(
        400,
        "invalid_task_types",
        `Invalid value in parameter \`types\`: \`${ty}\` is not a valid task type. Available types are ${TASK_TYPES.map((x) => `\`${x}\``).join(", ")}.`,
      );
    }
  }
  const limit = intParam(params, "limit", 20, "invalid_task_limit");
  const fromRaw = params.get("from");
  const from = fromRaw === null ? null : intParam(params, "from", 0, "invalid_task_from");
  const reverse = params.get("reverse") === "true";
  const dates: [string, "enqueuedAt" | "startedAt" | "finishedAt", 1 | -1][] = [
    ["afterEnqueuedAt", "enqueuedAt", 1],
    ["beforeEnqueuedAt", "enqueuedAt", -1],
    ["afterStartedAt", "startedAt", 1],
    ["beforeStartedAt", "startedAt", -1],
    ["afterFinishedAt", "finishedAt", 1],
    ["beforeFinishedAt", "finishedAt", -1],
  ];
  const dateFilters = dates.flatMap(([param, field, dir]) => {
    const v = params.get(param);
    if (v === null || v === "*") return [];
    const at = Date.parse(v);
    if (Number.isNaN(at))
      throw new ApiError(
        400,
        `invalid_task_${param.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`,
        `\`${v}\` is an invalid date-time. It should follow the YYYY-MM-DD or RFC 3339 date-time format.`,
      );
    return [{ field, dir, at }];
  });
  const matching = tasks.filter(
    (t) =>
      (!statuses || statuses.includes(t.status)) &&
      (!types || types.includes(t.type)) &&
      (!indexUids || (t.indexUid !== null && indexUids.includes(t.indexUid))) &&
      (!uids || uids.includes(String(t.uid))) &&
      (!batchUids || (t.batchUid !== null && batchUids.includes(String(t.batchUid)))) &&
      dateFilters.every(({ field, dir, at }) => {
        const v = t[field];
        if (v === null) return false;
        return dir === 1 ? Date.parse(v) > at : Date.parse(v) < at;
      }),
  );
  const ordered = reverse ? matching : [...matching].reverse();
  const startAt = from === null ? 0 : ordered.findIndex((t) => (reverse ? t.uid >= from : t.uid <= from));
  const page = startAt < 0 ? [] : ordered.slice(startAt, startAt + limit);
  const after = startAt < 0 ? undefined : ordered[startAt + limit];
  return {
    results: page.map(taskView),
    total: matching.length,
    limit,
    from: page.length ? page[0].uid : null,
    next: after ? after.uid : null,
  };
}
