import { createContext, useContext } from "react";

export type EditorShared = {
  titles: Record<string, { title: string; slug: string }>;
  rememberTitle: (id: string, t: { title: string; slug: string }) => void;
  procedureId: string;
};
export const EditorSharedContext = createContext<EditorShared>({ titles: {}, rememberTitle: () => {}, procedureId: "" });
export const useEditorShared = () => useContext(EditorSharedContext);
