CREATE TABLE "search_set_aside" (
	"kind" text NOT NULL,
	"entity_id" text NOT NULL,
	"reason" text NOT NULL,
	"attempts" integer DEFAULT 1 NOT NULL,
	"first_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "search_set_aside_kind_entity_id_pk" PRIMARY KEY("kind","entity_id")
);
