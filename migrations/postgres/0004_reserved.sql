-- Number 4 is kept for a change made on another branch; this empty step keeps
-- the numbering without gaps until that change lands, and is dropped then.
SELECT 1;
