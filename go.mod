module sizebudget

go 1.26
