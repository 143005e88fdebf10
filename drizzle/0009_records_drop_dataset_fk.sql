ALTER TABLE "records" DROP CONSTRAINT "records_dataset_id_datasets_id_fk";
