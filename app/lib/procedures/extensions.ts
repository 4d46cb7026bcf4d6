/** The TipTap extensions of a procedure document (shared by the editor and the server's structure check). */
import StarterKit from "@tiptap/starter-kit";
import { Table, TableCell, TableHeader, TableRow } from "@tiptap/extension-table";
import { CUSTOM_NODES } from "./nodes";

export const starterKit = StarterKit.configure({
  heading: { levels: [1, 2, 3, 4] },
  link: { openOnClick: false, autolink: true, protocols: ["http", "https", "mailto"], defaultProtocol: "https" },
  trailingNode: false,
});

export const baseExtensions = [starterKit, Table.configure({ resizable: false }), TableRow, TableHeader, TableCell, ...CUSTOM_NODES];
