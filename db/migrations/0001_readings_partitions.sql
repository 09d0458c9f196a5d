-- Raw readings are partitioned by time (ts, epoch ms) so retention drops whole partitions
-- instead of deleting rows. Daily partitions are added ahead of time by db/partitions.ts
-- (called by the migrate script and the worker's maintenance job) by splitting p_future.
ALTER TABLE `readings` PARTITION BY RANGE (`ts`) (
  PARTITION p_start VALUES LESS THAN (0),
  PARTITION p_future VALUES LESS THAN MAXVALUE
);
