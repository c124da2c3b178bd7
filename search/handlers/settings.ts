/**
 * Settings: GET|PATCH|DELETE /indexes/:uid/settings and GET|PUT|PATCH|DELETE /indexes/:uid/settings/<kebab-name> for
 * every setting in SETTINGS (the route table has one route per setting, so an unknown name answers 404).
 */
import { requireIndex } from "../apply.ts";
import { SETTINGS, validateSetting } from "../engine.ts";
import { asObject, jsonBody, rejectUnknown, send } from "../http.ts";
import type { Handler } from "../routes.ts";
import { enqueued } from "../tasks.ts";

export const getSettings: Handler = ({ res, uid, state: { indexes } }) => {
  send(res, 200, requireIndex(indexes, uid).settings);
};

/** PATCH: the given settings; DELETE: every setting back to its default. */
export const updateSettings: Handler = async ({
  req,
  res,
  method,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  let settings: Record<string, unknown>;
  if (method === "PATCH") {
    settings = asObject(await jsonBody(req));
    rejectUnknown(settings, Object.keys(SETTINGS));
    for (const [name, value] of Object.entries(settings)) validateSetting(name, value);
  } else {
    settings = Object.fromEntries(Object.keys(SETTINGS).map((k) => [k, null]));
  }
  send(res, 202, enqueued(enqueue("settingsUpdate", uid, { ...settings }, { kind: "settings", settings })));
};

const settingName = (segs: string[]) => Object.keys(SETTINGS).find((k) => SETTINGS[k].route === segs[3])!;

export const getSetting: Handler = ({ res, segs, uid, state: { indexes } }) => {
  send(res, 200, requireIndex(indexes, uid).settings[settingName(segs)]);
};

/** PUT or PATCH: the body is the new value; DELETE: back to the default. */
export const updateSetting: Handler = async ({
  req,
  res,
  method,
  segs,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const name = settingName(segs);
  let value: unknown = null;
  if (method !== "DELETE") {
    value = await jsonBody(req);
    validateSetting(name, value);
  }
  send(res, 202, enqueued(enqueue("settingsUpdate", uid, { [name]: value }, { kind: "settings", settings: { [name]: value } })));
};
